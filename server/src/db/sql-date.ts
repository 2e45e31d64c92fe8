/**
 * A Date as a MariaDB DATETIME(3) literal in UTC ('2026-12-02 14:03:00.125').
 * The connection's time zone is UTC (sequelize.ts), so this is the text
 * Sequelize would produce for a Date replacement; formatting it here skips its
 * per-value date library call, which showed in the ingest and scoring profiles.
 */
export function sqlDateTime(d: Date): string {
  const iso = d.toISOString(); // YYYY-MM-DDTHH:mm:ss.sssZ, always UTC
  return `${iso.slice(0, 10)} ${iso.slice(11, 23)}`;
}
