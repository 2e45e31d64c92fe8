import type { Request } from 'express';
import type { z } from 'zod';
import { auditRequest } from '../audit/record-audit';
import { publishEvents } from '../events/event-bus';
import type { Database } from '../db/database';
import { logger } from '../lib/logger';
import type { SlaPolicyInput, SupervisionSettingsResponse, thresholdInputSchema } from '@shared/api/supervision';
import { readAlertingSettings, writeAlertingSettings, type AlertingSettings } from './settings-repository';
import { readSupervisionSettings, settingUpdatedAt, writeSupervisionSettings } from './supervision-settings';
import type { SettingsDeps } from './routes';

export async function supervisionSettings(db: Database): Promise<SupervisionSettingsResponse> {
  const [a, s, updatedAt] = await Promise.all([readAlertingSettings(db), readSupervisionSettings(db), settingUpdatedAt(db, 'alerting')]);
  return {
    threshold: a.threshold,
    reviewBand: a.reviewBand,
    declineBand: a.declineBand,
    sla: { slaMinutes: a.slaMinutes, priorityBands: a.priorityBands },
    dailyCapacity: s.dailyCapacity,
    approvalLimit: s.approvalLimit,
    updatedAt: updatedAt?.toISOString() ?? null,
  };
}

/** The scoring worker and every web server drop their cached settings on this event. */
async function announce(d: SettingsDeps) {
  await publishEvents(d.redis, d.config.REDIS_PREFIX, [{ type: 'settings.changed', at: new Date().toISOString() }]).catch((err) =>
    logger().warn({ err: (err as Error).message }, 'settings.changed not published; workers pick the change up on their next refresh'),
  );
}

async function saveAlerting(d: SettingsDeps, req: Request, action: string, next: (a: AlertingSettings) => AlertingSettings) {
  const before = await readAlertingSettings(d.db);
  const after = next(before);
  await writeAlertingSettings(d.db, after, req.user!.id);
  await auditRequest(d.db, req, { action, targetType: 'settings', targetId: 'alerting', outcome: 'success', details: { before, after } });
  await announce(d);
}

export async function changeThreshold(d: SettingsDeps, req: Request, input: z.output<typeof thresholdInputSchema>) {
  const sup = await readSupervisionSettings(d.db);
  await writeSupervisionSettings(d.db, { ...sup, dailyCapacity: input.dailyCapacity }, req.user!.id);
  await saveAlerting(d, req, 'settings.threshold', (a) => ({ ...a, threshold: input.threshold }));
  return supervisionSettings(d.db);
}

export async function changeSlaPolicy(d: SettingsDeps, req: Request, input: SlaPolicyInput) {
  await saveAlerting(d, req, 'settings.sla', (a) => ({ ...a, slaMinutes: input.slaMinutes, priorityBands: input.priorityBands }));
  return supervisionSettings(d.db);
}

export async function changeApprovalLimit(d: SettingsDeps, req: Request, approvalLimit: number | null) {
  const before = await readSupervisionSettings(d.db);
  await writeSupervisionSettings(d.db, { ...before, approvalLimit }, req.user!.id);
  await auditRequest(d.db, req, {
    action: 'settings.approval_limit',
    targetType: 'settings',
    targetId: 'supervision',
    outcome: 'success',
    details: { before: before.approvalLimit, after: approvalLimit },
  });
  return supervisionSettings(d.db);
}
