import type { Request } from 'express';
import type { Redis } from 'ioredis';
import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db/database';
import type { PromotionDecisionInput, PromotionRequest, PromotionRequestInput, PromotionStatus } from '@shared/api/models';
import { promotionDecisionSchema } from '@shared/api/models';
import { AppError } from '../lib/app-error';
import { appendAudit } from '../audit/audit-repository';
import { actorFromRequest, auditRequest } from '../audit/record-audit';
import { publishEvents } from '../events/event-bus';
import { activeVersionIds, swapChampion } from './version-repository';

/**
 * Promotion and rollback under four eyes: a data scientist files a request
 * with a written reason; a supervisor approves (or turns it down). Approval
 * changes the roles in one database transaction (the champion retires, the
 * version becomes champion), is audited in the same transaction, and then
 * `model.changed` tells every scoring worker to reload: the new champion
 * scores the next transaction, no restart.
 */

export interface PromotionDeps {
  db: Database;
  redis: Redis;
  redisPrefix: string;
}

interface Row {
  id: number;
  kind: 'promote' | 'rollback';
  status: PromotionStatus;
  model_version_id: number;
  mv_label: string;
  from_champion_id: number | null;
  from_label: string | null;
  reason: string;
  requested_by: number;
  requester: string | null;
  requested_at: Date;
  decided_by: number | null;
  decider: string | null;
  decided_at: Date | null;
  decision_note: string | null;
}

const SELECT = `SELECT p.*, mv.label AS mv_label, fc.label AS from_label, ru.display_name AS requester, du.display_name AS decider
  FROM promotion_requests p
  JOIN model_versions mv ON mv.id = p.model_version_id
  LEFT JOIN model_versions fc ON fc.id = p.from_champion_id
  LEFT JOIN users ru ON ru.id = p.requested_by
  LEFT JOIN users du ON du.id = p.decided_by`;

function toView(r: Row): PromotionRequest {
  return {
    id: Number(r.id),
    kind: r.kind,
    status: r.status,
    modelVersion: { id: Number(r.model_version_id), label: r.mv_label },
    fromChampion: r.from_champion_id ? { id: Number(r.from_champion_id), label: r.from_label ?? `#${r.from_champion_id}` } : null,
    reason: r.reason,
    requestedBy: { id: Number(r.requested_by), displayName: r.requester ?? `user ${r.requested_by}` },
    requestedAt: new Date(r.requested_at).toISOString(),
    decidedBy: r.decided_by ? { id: Number(r.decided_by), displayName: r.decider ?? `user ${r.decided_by}` } : null,
    decidedAt: r.decided_at ? new Date(r.decided_at).toISOString() : null,
    decisionNote: r.decision_note,
  };
}

export async function listPromotions(db: Database, limit = 50): Promise<PromotionRequest[]> {
  const rows = await db.sequelize.query<Row>(`${SELECT} ORDER BY p.status = 'pending' DESC, p.id DESC LIMIT ?`, { replacements: [limit], type: QueryTypes.SELECT });
  return rows.map(toView);
}

async function findPromotion(db: Database, id: number, t?: Transaction): Promise<PromotionRequest | null> {
  const [row] = await db.sequelize.query<Row>(`${SELECT} WHERE p.id = ?`, { replacements: [id], type: QueryTypes.SELECT, transaction: t });
  return row ? toView(row) : null;
}

const changed = (d: PromotionDeps, requestId: number, status: string) =>
  publishEvents(d.redis, d.redisPrefix, [{ type: 'promotion.changed', requestId, status, at: new Date().toISOString() }]).catch(() => undefined);

/** Files a request to make a version champion: a newer one (promote) or an earlier, retired one (rollback). */
export async function requestPromotion(d: PromotionDeps, req: Request, input: PromotionRequestInput): Promise<PromotionRequest> {
  const [target] = await d.db.sequelize.query<{ id: number; role: string; label: string }>('SELECT id, role, label FROM model_versions WHERE id = ?', {
    replacements: [input.modelVersionId],
    type: QueryTypes.SELECT,
  });
  if (!target) throw AppError.notFound('No such model version.');
  if (target.role === 'champion') throw AppError.conflict(`${target.label} is the champion already.`, 'already_champion');
  const [open] = await d.db.sequelize.query<{ id: number }>("SELECT id FROM promotion_requests WHERE model_version_id = ? AND status = 'pending'", {
    replacements: [target.id],
    type: QueryTypes.SELECT,
  });
  if (open) throw AppError.conflict(`A request for ${target.label} is already waiting for approval (#${open.id}).`, 'request_pending');
  const { champion } = await activeVersionIds(d.db);
  const kind = target.role === 'retired' ? 'rollback' : 'promote';
  const [id] = await d.db.sequelize.query(
    `INSERT INTO promotion_requests (kind, status, model_version_id, from_champion_id, reason, requested_by, requested_at)
     VALUES (?, 'pending', ?, ?, ?, ?, UTC_TIMESTAMP(3))`,
    { replacements: [kind, target.id, champion, input.reason, req.user!.id], type: QueryTypes.INSERT },
  );
  await auditRequest(d.db, req, {
    action: `model.${kind}.request`,
    targetType: 'model_version',
    targetId: target.id,
    outcome: 'success',
    details: { requestId: Number(id), fromChampionId: champion, reason: input.reason },
  });
  await changed(d, Number(id), 'pending');
  return (await findPromotion(d.db, Number(id)))!;
}

/**
 * A supervisor's decision. Approving swaps the champion inside one
 * transaction with the request locked, so a request is applied once; a
 * request filed against a champion that has changed since is refused (the
 * evidence it was filed on no longer describes the switch).
 */
export async function decidePromotion(d: PromotionDeps, req: Request, id: number, raw: PromotionDecisionInput): Promise<PromotionRequest> {
  const input = promotionDecisionSchema.parse(raw);
  const me = req.user!;
  const result = await d.db.sequelize.transaction(async (t) => {
    const [row] = await d.db.sequelize.query<{ status: PromotionStatus; model_version_id: number; from_champion_id: number | null; requested_by: number; kind: string }>(
      'SELECT status, model_version_id, from_champion_id, requested_by, kind FROM promotion_requests WHERE id = ? FOR UPDATE',
      { replacements: [id], type: QueryTypes.SELECT, transaction: t },
    );
    if (!row) throw AppError.notFound('No such promotion request.');
    if (row.status !== 'pending') throw AppError.conflict(`This request was ${row.status} already.`, 'request_decided');
    if (Number(row.requested_by) === me.id) throw AppError.forbidden('Four eyes: someone other than the requester decides.');
    const target = Number(row.model_version_id);
    let previous: number | null = null;
    if (input.decision === 'approve') {
      const { champion } = await activeVersionIds(d.db, t);
      if ((row.from_champion_id === null ? null : Number(row.from_champion_id)) !== champion) {
        throw AppError.conflict('The champion changed since this request was filed: turn it down and ask for a new one.', 'champion_changed');
      }
      previous = (await swapChampion(d.db, t, target)).previous;
    }
    await d.db.sequelize.query('UPDATE promotion_requests SET status = ?, decided_by = ?, decided_at = UTC_TIMESTAMP(3), decision_note = ? WHERE id = ?', {
      replacements: [input.decision === 'approve' ? 'approved' : 'rejected', me.id, input.note || null, id],
      type: QueryTypes.UPDATE,
      transaction: t,
    });
    await appendAudit(
      d.db,
      {
        ...actorFromRequest(req),
        action: `model.${row.kind}.${input.decision === 'approve' ? 'approve' : 'reject'}`,
        targetType: 'model_version',
        targetId: target,
        outcome: 'success',
        details: { requestId: id, previousChampionId: previous, note: input.note || null },
      },
      t,
    );
    return { approved: input.decision === 'approve' };
  });
  if (result.approved) await publishEvents(d.redis, d.redisPrefix, [{ type: 'model.changed', at: new Date().toISOString() }]);
  await changed(d, id, result.approved ? 'approved' : 'rejected');
  return (await findPromotion(d.db, id))!;
}

/** The requester takes a pending request back. */
export async function withdrawPromotion(d: PromotionDeps, req: Request, id: number): Promise<PromotionRequest> {
  const [, affected] = (await d.db.sequelize.query(
    "UPDATE promotion_requests SET status = 'withdrawn', decided_by = requested_by, decided_at = UTC_TIMESTAMP(3) WHERE id = ? AND status = 'pending' AND requested_by = ?",
    { replacements: [id, req.user!.id], type: QueryTypes.UPDATE },
  )) as unknown as [unknown, number];
  const found = await findPromotion(d.db, id);
  if (!found) throw AppError.notFound('No such promotion request.');
  if (affected !== 1) throw AppError.conflict(found.status === 'pending' ? 'Only the person who filed a request can withdraw it.' : `This request was ${found.status} already.`, 'request_decided');
  await auditRequest(d.db, req, { action: `model.${found.kind}.withdraw`, targetType: 'model_version', targetId: found.modelVersion.id, outcome: 'success', details: { requestId: id } });
  await changed(d, id, 'withdrawn');
  return found;
}
