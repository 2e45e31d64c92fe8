import type { DomainEvent } from '../events/event-bus';
import { DRIFT_REPORTED_EVENT, MODELS_CHANGED_EVENT, PROMOTION_CHANGED_EVENT, TRAINING_PROGRESS_EVENT } from '@shared/api/models';
import { QUEUE_ALERT_EVENT, QUEUE_CASE_CHANGED_EVENT, SOCKET_EVENTS, type SocketEventName } from '@shared/api/realtime';
import { can, ROLES } from '@shared/auth/roles';
import { caseAudience } from '../cases/case-access';
import { logger } from '../lib/logger';
import { rooms, type SocketHub } from './socket-hub';

/**
 * The socket event each domain event becomes; null: not pushed (scored
 * transactions are too many and no screen needs them one by one; settings and
 * cancellations concern servers and workers only). Typed over every domain
 * event, so a new one does not compile until it is given a line here.
 */
const PUSHED: { [T in DomainEvent['type']]: SocketEventName | null } = {
  'case.alerted': QUEUE_ALERT_EVENT,
  'case.changed': QUEUE_CASE_CHANGED_EVENT,
  'model.changed': MODELS_CHANGED_EVENT,
  'settings.changed': null,
  'training.progress': TRAINING_PROGRESS_EVENT,
  'training.cancel': null,
  'promotion.changed': PROMOTION_CHANGED_EVENT,
  'drift.reported': DRIFT_REPORTED_EVENT,
  'teams.changed': null,
  'apikeys.changed': null,
  // Sent by the socket hub itself, to the ended session's or person's sockets only.
  'sessions.ended': null,
};

/** What an event is about, for audiences narrower than whole roles. */
export interface PushScope {
  /** The case (per-case events): its team, its holder and, after a change of hands, the previous holder. */
  case?: { teamId: number | null; assigneeId: number | null; previousAssigneeId?: number | null };
  /** The person (person events). */
  userId?: number;
}

/**
 * The rooms an event goes to, and the role rooms it must never reach (roles
 * without the capability, even if they sit in a person's or team's room), by
 * the event's line in SOCKET_EVENTS.
 */
export function audienceRooms(name: SocketEventName, scope: PushScope = {}): { to: string[]; except: string[] } {
  const audience = SOCKET_EVENTS[name];
  if (audience.to === 'connection' || audience.to === 'ended-session') throw new Error(`${name} is sent by the socket hub itself`);
  const holders = ROLES.filter((r) => can(r, audience.capability));
  const except = ROLES.filter((r) => !holders.includes(r)).map(rooms.role);
  if (audience.to === 'person') {
    if (scope.userId === undefined) throw new Error(`${name} needs the person it is for`);
    return { to: [rooms.user(scope.userId)], except };
  }
  if (!('perCase' in audience)) return { to: holders.map(rooms.role), except };
  if (!scope.case) throw new Error(`${name} needs the case it is about`);
  const who = caseAudience(scope.case);
  const to = holders.filter((r) => who.everyone || can(r, 'case:any-team')).map(rooms.role);
  if (!who.everyone) {
    if (Number.isInteger(who.teamId)) to.push(rooms.team(who.teamId!));
    // The previous holder hears that the case left them (they knew its id already).
    for (const id of [...who.userIds, scope.case.previousAssigneeId]) if (typeof id === 'number') to.push(rooms.user(id));
  }
  return { to, except };
}

/** Sends one socket event to exactly the audience SOCKET_EVENTS gives it. */
export function pushToSockets(hub: SocketHub, name: SocketEventName, payload: unknown, scope: PushScope = {}): void {
  const { to, except } = audienceRooms(name, scope);
  if (to.length === 0) return;
  hub.io.to(to).except(except).emit(name, payload);
}

/** Which consoles hear which domain events: by PUSHED and SOCKET_EVENTS. */
export function bridgeEventsToSockets(hub: SocketHub, e: DomainEvent): void {
  if (e.type === 'teams.changed') {
    hub.refreshTeams().catch((err: Error) => logger().warn({ err: err.message }, 'team rooms not refreshed'));
    return;
  }
  if (e.type === 'sessions.ended') {
    hub.closeRoom(e.room, e.reason);
    return;
  }
  const name = PUSHED[e.type];
  if (!name) return;
  // An event without a team (from an older publisher) reaches no team room: only every-team roles and the holder hear it.
  const scope: PushScope =
    e.type === 'case.alerted' || e.type === 'case.changed'
      ? { case: { teamId: e.teamId, assigneeId: e.assigneeId, previousAssigneeId: e.type === 'case.changed' ? e.previousAssigneeId : null } }
      : {};
  pushToSockets(hub, name, e, scope);
}
