import { DatabaseError, type Transaction } from 'sequelize';

interface DriverConnection {
  query(sql: string, values?: unknown[]): Promise<unknown>;
}

/**
 * A statement sent straight to the driver on the connection of a Sequelize transaction, its `?`
 * placeholders bound by the driver (an array value becomes a list, for `IN (?)`). For the
 * statements of the ingest and scoring paths, which run thousands of times a second: Sequelize's
 * query() captures a stack trace, rescans the statement and reformats the result on every call,
 * a tenth of the web server's CPU per synchronous decision. Errors come back as Sequelize's
 * DatabaseError with the driver's error as `parent`, as from query(), so deadlock retries and the
 * error handler see the same shape; rows come back with the connection's own type casts.
 */
export async function rawQuery<R = unknown>(t: Transaction, sql: string, values: readonly unknown[]): Promise<R> {
  const connection = (t as unknown as { connection?: DriverConnection }).connection;
  if (!connection) throw new Error('rawQuery: the transaction has no connection yet');
  try {
    return (await connection.query(sql, values as unknown[])) as R;
  } catch (err) {
    throw new DatabaseError(err as Error & { sql: string; parameters: object });
  }
}
