import type { Redis } from 'ioredis';
import type { TrainingProgressEvent } from '@shared/api/models';

/**
 * Domain events travel from workers to every web server over Redis pub/sub;
 * each server pushes them to its own sockets. Pub/sub is fire-and-forget: a
 * console that missed events (disconnect, server restart) resyncs through the
 * API, which is the source of truth.
 */
export type DomainEvent =
  | {
      type: 'case.alerted';
      caseId: number;
      created: boolean;
      transactionId: number;
      /** The upstream id, so a client or benchmark can match the alert to what it sent. */
      externalId: string;
      probability: number;
      status: string;
      assigneeId: number | null;
      /** The case's team: with the assignee, it decides which investigators hear of the case. */
      teamId: number | null;
      at: string;
    }
  | { type: 'case.changed'; caseId: number; status: string; assigneeId: number | null; previousAssigneeId?: number | null; teamId: number | null; at: string }
  /** Team memberships changed: web servers recompute which team rooms their sockets sit in. */
  | { type: 'teams.changed'; at: string }
  /** An API key was revoked: every web server drops its cached keys at once. */
  | { type: 'apikeys.changed'; at: string }
  /** A session was signed out or a person deactivated: every web server ends the sockets of that session or person room. */
  | { type: 'sessions.ended'; room: string; reason: 'signed_out' | 'deactivated' | 'expired'; at: string }
  | { type: 'model.changed'; at: string }
  | { type: 'settings.changed'; at: string }
  | ({ type: 'training.progress' } & TrainingProgressEvent)
  | { type: 'training.cancel'; runId: number; at: string }
  | { type: 'promotion.changed'; requestId: number; status: string; at: string }
  | { type: 'drift.reported'; reportId: number; modelVersionId: number; flagged: string[]; at: string };

export const eventsChannel = (prefix: string) => `${prefix}:events`;

export async function publishEvents(redis: Redis, prefix: string, events: DomainEvent[]): Promise<void> {
  if (events.length === 0) return;
  const pipeline = redis.pipeline();
  for (const e of events) pipeline.publish(eventsChannel(prefix), JSON.stringify(e));
  await pipeline.exec();
}

export function subscribeEvents(subscriber: Redis, prefix: string, onEvent: (e: DomainEvent) => void): Promise<void> {
  subscriber.on('message', (channel: string, message: string) => {
    if (channel !== eventsChannel(prefix)) return;
    try {
      onEvent(JSON.parse(message) as DomainEvent);
    } catch {
      // A malformed event is dropped; consoles resync through the API.
    }
  });
  return subscriber.subscribe(eventsChannel(prefix)).then(() => undefined);
}
