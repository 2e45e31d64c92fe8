import type { Redis } from 'ioredis';
import { needs, type RouteSpec } from '../access/route-table';
import { parseOrThrow } from '../lib/validate';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { approvalLimitSchema, slaPolicySchema, thresholdCurveQuerySchema, thresholdInputSchema } from '@shared/api/supervision';
import { readAlertingSettings } from './settings-repository';
import { buildThresholdCurve } from './threshold-curve';
import { changeApprovalLimit, changeSlaPolicy, changeThreshold, supervisionSettings } from './change-settings';

export interface SettingsDeps {
  db: Database;
  redis: Redis;
  config: Config;
}

export function settingsRoutes(d: SettingsDeps): RouteSpec[] {
  return [
    {
      method: 'get',
      path: '/settings/supervision',
      // Investigators read it too: the Case file says in advance when a decision will wait for approval.
      access: needs('queue:read'),
      summary: 'Alert threshold, SLA policy, daily capacity and four-eyes limit',
      handler: async (_req, res) => {
        res.json(await supervisionSettings(d.db));
      },
    },
    {
      method: 'get',
      path: '/settings/threshold-curve',
      access: needs('settings:alerting'),
      summary: 'Expected alerts and cases per day, precision and recall at each threshold',
      handler: async (req, res) => {
        const q = parseOrThrow(thresholdCurveQuerySchema, req.query, 'query string');
        const alerting = await readAlertingSettings(d.db);
        res.json(await buildThresholdCurve(d.db, q.days, alerting.threshold));
      },
    },
    {
      method: 'put',
      path: '/settings/threshold',
      access: needs('settings:alerting'),
      summary: 'Set the alert threshold (and the daily capacity it came from); the scoring worker picks it up at once',
      handler: async (req, res) => {
        const body = parseOrThrow(thresholdInputSchema, req.body);
        res.json(await changeThreshold(d, req, body));
      },
    },
    {
      method: 'put',
      path: '/settings/sla',
      access: needs('settings:alerting'),
      summary: 'Set the SLA minutes and the probability bands of each priority',
      handler: async (req, res) => {
        const body = parseOrThrow(slaPolicySchema, req.body);
        res.json(await changeSlaPolicy(d, req, body));
      },
    },
    {
      method: 'put',
      path: '/settings/approval-limit',
      access: needs('settings:alerting'),
      summary: 'Set the amount at risk above which a disposition needs a second person',
      handler: async (req, res) => {
        const body = parseOrThrow(approvalLimitSchema, req.body);
        res.json(await changeApprovalLimit(d, req, body.approvalLimit));
      },
    },
  ];
}
