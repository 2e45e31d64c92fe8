import { z } from 'zod';
import { startTrainingSchema, trainingScheduleSchema } from '@shared/api/models';
import { needs, type RouteSpec } from '../access/route-table';
import { AppError } from '../lib/app-error';
import { parseOrThrow } from '../lib/validate';
import { findRun, listRuns } from './training-run-repository';
import { cancelTraining, scheduleView, startTraining, updateSchedule, type TrainingDeps } from './start-training';

const idParam = z.coerce.number().int().positive();

export function trainingRoutes(d: TrainingDeps): RouteSpec[] {
  const runId = (raw: unknown) => parseOrThrow(idParam, raw, 'run id');
  return [
    {
      method: 'get',
      path: '/training/runs',
      access: needs('models:read'),
      summary: 'Recent training runs, newest first',
      handler: async (_req, res) => {
        res.json({ runs: await listRuns(d.db) });
      },
    },
    {
      method: 'post',
      path: '/training/runs',
      access: needs('models:train'),
      summary: 'Train now: queue a training run (window and rounds default to the schedule’s)',
      handler: async (req, res) => {
        const body = parseOrThrow(startTrainingSchema, req.body ?? {});
        res.status(202).json({ run: await startTraining(d, req, body) });
      },
    },
    {
      method: 'get',
      path: '/training/runs/:id',
      access: needs('models:read'),
      summary: 'One training run with its progress and loss curve so far',
      handler: async (req, res) => {
        const run = await findRun(d.db, runId(req.params.id));
        if (!run) throw AppError.notFound('No such training run.');
        res.json({ run });
      },
    },
    {
      method: 'post',
      path: '/training/runs/:id/cancel',
      access: needs('models:train'),
      summary: 'Cancel a training run (a running one stops after its current round; nothing is registered)',
      handler: async (req, res) => {
        res.json({ run: await cancelTraining(d, req, runId(req.params.id)) });
      },
    },
    {
      method: 'get',
      path: '/training/schedule',
      access: needs('models:read'),
      summary: 'The nightly retraining schedule, its next and last run',
      handler: async (_req, res) => {
        res.json(await scheduleView(d));
      },
    },
    {
      method: 'put',
      path: '/training/schedule',
      access: needs('models:train'),
      summary: 'Change the retraining schedule (cron pattern, time zone, window, rounds)',
      handler: async (req, res) => {
        const body = parseOrThrow(trainingScheduleSchema, req.body);
        res.json(await updateSchedule(d, req, body));
      },
    },
  ];
}
