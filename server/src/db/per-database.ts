import type { Database } from './database';

/** One value per open database (a cache, say), made on first use and gone with the database object. */
export function perDatabase<T extends object>(make: () => T): (db: Database) => T {
  const values = new WeakMap<Database, T>();
  return (db) => {
    let v = values.get(db);
    if (!v) {
      v = make();
      values.set(db, v);
    }
    return v;
  };
}
