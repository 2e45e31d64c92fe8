import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import { mccInfo } from '@shared/reference/mcc';
import type { ActivityItem, AlertDetail, CaseDetail, CaseEvidence, CaseMessage, CaseNote, CaseTimelineEntry, RelatedCase } from '@shared/api/cases';
import { readAlertingSettings } from '../settings/settings-repository';
import { AppError } from '../lib/app-error';
import { getCaseRow, toSummary } from './case-queries';
import { demoCardholderContact } from '../demo/demo-directory';
import { visibleCaseSql, type CaseViewer } from './case-access';

const iso = (d: Date | string) => new Date(d).toISOString();
const ACTIVITY_LIMIT = 50;

interface AlertRow {
  alert_id: number;
  transaction_id: number;
  external_id: string;
  occurred_at: Date;
  amount_minor: number;
  currency: string;
  currency_exponent: number;
  merchant_ref: string;
  merchant_name: string;
  mcc: string;
  merchant_country: string;
  channel: string;
  card_present: number;
  device_id: string | null;
  ip: string | null;
  lat: number | null;
  lon: number | null;
  probability: number;
  normalized_margin: number;
  margin: number;
  reasons: string;
  features: string | null;
  model_version_id: number;
  model_label: string;
}

/**
 * Everything the case file shows, in a fixed number of queries (no per-row
 * lookups): the case, its alerts with reasons and features, the card's recent
 * activity, related open cases by card, device or IP, notes, evidence,
 * messages and the audit timeline. With a viewer, the case and its related
 * cases are only those the viewer may see.
 */
export async function getCaseFile(db: Database, id: number, opts: { demoDirectory?: boolean; viewer?: CaseViewer } = {}): Promise<CaseDetail> {
  const row = await getCaseRow(db, id, { viewer: opts.viewer });
  if (!row) throw AppError.notFound('No such case.');
  const q = <T extends object>(sql: string, replacements: unknown[] | Record<string, unknown>) =>
    db.sequelize.query<T>(sql, { replacements, type: QueryTypes.SELECT });

  const [alerts, activity, notes, evidence, messages, timeline, holder, settings] = await Promise.all([
    q<AlertRow>(
      `SELECT a.id AS alert_id, t.id AS transaction_id, t.external_id, t.occurred_at, t.amount_minor, t.currency, t.currency_exponent,
              t.merchant_ref, t.merchant_name, t.mcc, t.merchant_country, t.channel, t.card_present, t.device_id, t.ip, t.lat, t.lon,
              s.probability, s.normalized_margin, s.margin, s.reasons, f.features, s.model_version_id, m.label AS model_label
       FROM alerts a
       JOIN transactions t ON t.id = a.transaction_id
       JOIN transaction_scores s ON s.transaction_id = t.id
       LEFT JOIN transaction_features f ON f.transaction_id = t.id
       JOIN model_versions m ON m.id = s.model_version_id
       WHERE a.case_id = ?
       ORDER BY s.probability DESC, t.occurred_at DESC`,
      [id],
    ),
    q<{
      id: number;
      external_id: string;
      occurred_at: Date;
      amount_minor: number;
      currency: string;
      currency_exponent: number;
      merchant_name: string;
      mcc: string;
      merchant_country: string;
      channel: string;
      card_present: number;
      probability: number | null;
      features: string | null;
      case_id: number | null;
    }>(
      `SELECT t.id, t.external_id, t.occurred_at, t.amount_minor, t.currency, t.currency_exponent, t.merchant_name, t.mcc,
              t.merchant_country, t.channel, t.card_present, s.probability, f.features, a.case_id
       FROM transactions t
       LEFT JOIN transaction_scores s ON s.transaction_id = t.id
       LEFT JOIN transaction_features f ON f.transaction_id = t.id
       LEFT JOIN alerts a ON a.transaction_id = t.id
       WHERE t.card_id = ?
       ORDER BY t.occurred_at DESC, t.id DESC
       LIMIT ${ACTIVITY_LIMIT}`,
      [row.card_id],
    ),
    q<{ id: number; author_id: number; author_name: string; text: string; created_at: Date }>(
      'SELECT n.id, n.author_id, u.display_name AS author_name, n.text, n.created_at FROM case_notes n JOIN users u ON u.id = n.author_id WHERE n.case_id = ? ORDER BY n.id',
      [id],
    ),
    q<{ id: number; file_name: string; content_type: string; size: number; uploaded_by: number; uploader_name: string; created_at: Date }>(
      'SELECT e.id, e.file_name, e.content_type, e.size, e.uploaded_by, u.display_name AS uploader_name, e.created_at FROM case_evidence e JOIN users u ON u.id = e.uploaded_by WHERE e.case_id = ? ORDER BY e.id',
      [id],
    ),
    q<{ id: number; to_address: string; subject: string; text: string; sent_by: number; sender_name: string; status: CaseMessage['status']; created_at: Date }>(
      'SELECT m.id, m.to_address, m.subject, m.text, m.sent_by, u.display_name AS sender_name, m.status, m.created_at FROM case_messages m JOIN users u ON u.id = m.sent_by WHERE m.case_id = ? ORDER BY m.id',
      [id],
    ),
    q<{ occurred_at: Date; actor_label: string | null; action: string; outcome: string; details: string | null }>(
      "SELECT occurred_at, actor_label, action, outcome, details FROM audit_log WHERE target_type = 'case' AND target_id = ? ORDER BY id",
      [String(id)],
    ),
    q<{ display_name: string | null; email: string | null }>('SELECT display_name, email FROM cardholders WHERE ref = ?', [row.cardholder_ref]),
    readAlertingSettings(db),
  ]);

  const devices = [...new Set(alerts.map((a) => a.device_id).filter((d): d is string => !!d))];
  const ips = [...new Set(alerts.map((a) => a.ip).filter((d): d is string => !!d))];
  const related: RelatedCase[] = [];
  if (devices.length || ips.length) {
    const visible = opts.viewer ? visibleCaseSql(opts.viewer) : { sql: '1 = 1', replacements: {} };
    const rows = await q<{ id: number; status: RelatedCase['status']; probability: number; bin: string; last4: string; card_id: number; device_id: string | null; ip: string | null }>(
      `SELECT c.id, c.status, c.highest_probability AS probability, k.bin, k.last4, c.card_id, t.device_id, t.ip
       FROM transactions t
       JOIN alerts a ON a.transaction_id = t.id
       JOIN cases c ON c.id = a.case_id
       JOIN cards k ON k.id = c.card_id
       WHERE c.id <> :id AND c.is_open = 1 AND ${visible.sql} AND (${[devices.length ? 't.device_id IN (:devices)' : '', ips.length ? 't.ip IN (:ips)' : ''].filter(Boolean).join(' OR ')})
       LIMIT 200`,
      { ...visible.replacements, id, devices, ips },
    );
    const byCase = new Map<number, RelatedCase>();
    for (const r of rows) {
      const rc = byCase.get(Number(r.id)) ?? { id: Number(r.id), status: r.status, probability: r.probability, via: [], card: { bin: r.bin, last4: r.last4 } };
      if (Number(r.card_id) === Number(row.card_id) && !rc.via.includes('card')) rc.via.push('card');
      if (r.device_id && devices.includes(r.device_id) && !rc.via.includes('device')) rc.via.push('device');
      if (r.ip && ips.includes(r.ip) && !rc.via.includes('ip')) rc.via.push('ip');
      byCase.set(rc.id, rc);
    }
    related.push(...[...byCase.values()].sort((a, b) => b.probability - a.probability).slice(0, 20));
  }

  const top = alerts[0]?.probability ?? row.highest_probability;
  const summary = toSummary(row);
  const alertDetails: AlertDetail[] = alerts.map((a) => ({
    alertId: Number(a.alert_id),
    transactionId: Number(a.transaction_id),
    externalId: a.external_id,
    occurredAt: iso(a.occurred_at),
    amount: { minor: Number(a.amount_minor), currency: a.currency, exponent: Number(a.currency_exponent) },
    merchant: { id: a.merchant_ref, name: a.merchant_name, mcc: a.mcc, mccLabel: mccInfo(a.mcc)?.description ?? null, country: a.merchant_country },
    channel: a.channel,
    cardPresent: Boolean(a.card_present),
    deviceId: a.device_id,
    ip: a.ip,
    location: a.lat !== null && a.lon !== null ? { lat: a.lat, lon: a.lon } : null,
    probability: a.probability,
    normalizedMargin: a.normalized_margin,
    margin: a.margin,
    reasons: JSON.parse(a.reasons),
    features: a.features ? JSON.parse(a.features) : {},
    model: { id: Number(a.model_version_id), label: a.model_label },
  }));
  const activityItems: ActivityItem[] = activity.map((t) => {
    const f = t.features ? (JSON.parse(t.features) as Record<string, number | null>) : {};
    return {
      transactionId: Number(t.id),
      externalId: t.external_id,
      occurredAt: iso(t.occurred_at),
      amount: { minor: Number(t.amount_minor), currency: t.currency, exponent: Number(t.currency_exponent) },
      merchantName: t.merchant_name,
      mcc: t.mcc,
      country: t.merchant_country,
      channel: t.channel,
      cardPresent: Boolean(t.card_present),
      probability: t.probability,
      distanceKm: typeof f.distance_km === 'number' ? f.distance_km : null,
      speedKmh: typeof f.speed_kmh === 'number' ? f.speed_kmh : null,
      inThisCase: t.case_id !== null && Number(t.case_id) === id,
      alerted: t.case_id !== null,
    };
  });
  return {
    case: {
      ...summary,
      disposition: row.disposition,
      closedAt: row.closed_at ? iso(row.closed_at) : null,
      cardholder: (() => {
        const demo = !holder[0] && opts.demoDirectory ? demoCardholderContact(row.cardholder_ref) : null;
        return { ref: row.cardholder_ref, name: holder[0]?.display_name ?? demo?.name ?? null, email: holder[0]?.email ?? demo?.email ?? null };
      })(),
    },
    recommendedAction: top >= settings.declineBand ? 'decline' : top >= settings.reviewBand ? 'review' : 'approve',
    alerts: alertDetails,
    activity: activityItems,
    related,
    notes: notes.map(
      (n): CaseNote => ({ id: Number(n.id), author: { id: Number(n.author_id), displayName: n.author_name }, text: n.text, createdAt: iso(n.created_at) }),
    ),
    evidence: evidence.map(
      (e): CaseEvidence => ({
        id: Number(e.id),
        fileName: e.file_name,
        contentType: e.content_type,
        size: Number(e.size),
        uploadedBy: { id: Number(e.uploaded_by), displayName: e.uploader_name },
        createdAt: iso(e.created_at),
      }),
    ),
    messages: messages.map(
      (m): CaseMessage => ({
        id: Number(m.id),
        to: m.to_address,
        subject: m.subject,
        text: m.text,
        sentBy: { id: Number(m.sent_by), displayName: m.sender_name },
        createdAt: iso(m.created_at),
        status: m.status,
      }),
    ),
    timeline: timeline.map(
      (t): CaseTimelineEntry => ({ at: iso(t.occurred_at), actor: t.actor_label, action: t.action, outcome: t.outcome, details: t.details ? JSON.parse(t.details) : null }),
    ),
    serverTime: new Date().toISOString(),
  };
}
