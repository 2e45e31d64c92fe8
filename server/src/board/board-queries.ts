import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import type { AlertVolumeHour, BoardPerson, BoardResponse, QueueAgeBucket } from '@shared/api/supervision';
import { readSupervisionSettings } from '../settings/supervision-settings';

/** Queue-age bins (minutes since the case opened); the last is open-ended. */
export const AGE_BUCKETS: { label: string; from: number; to: number | null }[] = [
  { label: '< 15 min', from: 0, to: 15 },
  { label: '15–30 min', from: 15, to: 30 },
  { label: '30–60 min', from: 30, to: 60 },
  { label: '1–2 h', from: 60, to: 120 },
  { label: '2–4 h', from: 120, to: 240 },
  { label: '4–8 h', from: 240, to: 480 },
  { label: '8–24 h', from: 480, to: 1440 },
  { label: '> 24 h', from: 1440, to: null },
];

/** Median of a list (mean of the middle two for an even count); null for none. */
export function median(values: number[]): number | null {
  if (values.length === 0) return null;
  const s = [...values].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
}

const hourKey = (d: Date) => new Date(Math.floor(d.getTime() / 3_600_000) * 3_600_000).toISOString();

/** Everything the team board shows, read in a fixed number of queries. */
export async function boardSummary(db: Database, now = new Date()): Promise<BoardResponse> {
  const dayStart = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate()));
  const since = new Date(Math.floor(now.getTime() / 3_600_000) * 3_600_000 - 23 * 3_600_000);
  const ageCase = AGE_BUCKETS.map((b, i) =>
    b.to === null ? `ELSE ${i}` : `WHEN TIMESTAMPDIFF(SECOND, created_at, :now) < ${b.to * 60} THEN ${i}`,
  ).join(' ');

  const [people, closed, unassigned, ages, alerts, opened, policy] = await Promise.all([
    db.sequelize.query<{ id: number; display_name: string; role: 'investigator' | 'supervisor'; status: BoardPerson['status']; open_n: number; claimed: number; breaches: number }>(
      `SELECT u.id, u.display_name, u.role, u.status,
              COUNT(c.id) AS open_n, COALESCE(SUM(c.status = 'claimed'), 0) AS claimed, COALESCE(SUM(c.sla_due_at < :now), 0) AS breaches
       FROM users u LEFT JOIN cases c ON c.assignee_id = u.id AND c.is_open = 1
       WHERE u.role IN ('investigator', 'supervisor')
       GROUP BY u.id, u.display_name, u.role, u.status
       HAVING u.status = 'active' OR open_n > 0
       ORDER BY u.role, u.display_name`,
      { replacements: { now }, type: QueryTypes.SELECT },
    ),
    db.sequelize.query<{ assignee_id: number; seconds: number | null }>(
      `SELECT assignee_id, TIMESTAMPDIFF(SECOND, claimed_at, closed_at) AS seconds
       FROM cases WHERE closed_at >= :dayStart AND status = 'closed' AND assignee_id IS NOT NULL`,
      { replacements: { dayStart }, type: QueryTypes.SELECT },
    ),
    db.sequelize.query<{ unassigned: number; breaches: number; awaiting: number; total: number; total_breaches: number }>(
      `SELECT COALESCE(SUM(assignee_id IS NULL), 0) AS unassigned, COALESCE(SUM(assignee_id IS NULL AND sla_due_at < :now), 0) AS breaches,
              COALESCE(SUM(status = 'awaiting_approval'), 0) AS awaiting, COUNT(*) AS total, COALESCE(SUM(sla_due_at < :now), 0) AS total_breaches
       FROM cases WHERE is_open = 1`,
      { replacements: { now }, type: QueryTypes.SELECT },
    ),
    db.sequelize.query<{ b: number; n: number; breached: number }>(
      `SELECT CASE ${ageCase} END AS b, COUNT(*) AS n, COALESCE(SUM(sla_due_at < :now), 0) AS breached FROM cases WHERE is_open = 1 GROUP BY b`,
      { replacements: { now }, type: QueryTypes.SELECT },
    ),
    db.sequelize.query<{ created_at: Date; n: number }>(
      `SELECT FROM_UNIXTIME(FLOOR(UNIX_TIMESTAMP(created_at) / 3600) * 3600) AS created_at, COUNT(*) AS n FROM alerts WHERE created_at >= :since GROUP BY 1`,
      { replacements: { since }, type: QueryTypes.SELECT },
    ),
    db.sequelize.query<{ created_at: Date; n: number }>(
      `SELECT FROM_UNIXTIME(FLOOR(UNIX_TIMESTAMP(created_at) / 3600) * 3600) AS created_at, COUNT(*) AS n FROM cases WHERE created_at >= :since GROUP BY 1`,
      { replacements: { since }, type: QueryTypes.SELECT },
    ),
    readSupervisionSettings(db),
  ]);

  const handled = new Map<number, number[]>();
  const closedCount = new Map<number, number>();
  for (const r of closed) {
    const id = Number(r.assignee_id);
    closedCount.set(id, (closedCount.get(id) ?? 0) + 1);
    if (r.seconds !== null) handled.set(id, [...(handled.get(id) ?? []), Number(r.seconds) / 60]);
  }

  const queueAge: QueueAgeBucket[] = AGE_BUCKETS.map((b, i) => {
    const row = ages.find((a) => Number(a.b) === i);
    return { label: b.label, fromMinutes: b.from, toMinutes: b.to, count: Number(row?.n ?? 0), breached: Number(row?.breached ?? 0) };
  });

  const alertsBy = new Map(alerts.map((r) => [hourKey(new Date(r.created_at)), Number(r.n)]));
  const openedBy = new Map(opened.map((r) => [hourKey(new Date(r.created_at)), Number(r.n)]));
  const alertVolume: AlertVolumeHour[] = Array.from({ length: 24 }, (_, i) => {
    const hour = new Date(since.getTime() + i * 3_600_000).toISOString();
    return { hour, alerts: alertsBy.get(hour) ?? 0, casesOpened: openedBy.get(hour) ?? 0 };
  });

  const u = unassigned[0];
  return {
    people: people.map((p) => {
      const id = Number(p.id);
      const m = median(handled.get(id) ?? []);
      return {
        id,
        displayName: p.display_name,
        role: p.role,
        status: p.status,
        open: Number(p.open_n),
        claimed: Number(p.claimed),
        closedToday: closedCount.get(id) ?? 0,
        medianHandlingMinutes: m === null ? null : Math.round(m * 10) / 10,
        slaBreaches: Number(p.breaches),
      };
    }),
    unassigned: { open: Number(u?.unassigned ?? 0), slaBreaches: Number(u?.breaches ?? 0) },
    totals: { open: Number(u?.total ?? 0), slaBreaches: Number(u?.total_breaches ?? 0), awaitingApproval: Number(u?.awaiting ?? 0) },
    queueAge,
    alertVolume,
    capacity: { dailyCases: policy.dailyCapacity, perHour: policy.dailyCapacity === null ? null : policy.dailyCapacity / 24 },
    dayStart: dayStart.toISOString(),
    serverTime: now.toISOString(),
  };
}
