import type { Capability } from '../auth/roles';
import { BACKFILL_PROGRESS_EVENT } from './backfill';
import { DRIFT_REPORTED_EVENT, MODELS_CHANGED_EVENT, PROMOTION_CHANGED_EVENT, TRAINING_PROGRESS_EVENT } from './models';

/** The server greets each socket it accepted with the person's id and role. */
export const HELLO_EVENT = 'hello';
/** Sent, then the socket is closed, when its session is signed out or its person deactivated. */
export const SESSION_ENDED_EVENT = 'session:ended';
/** A transaction alerted (a case opened or grew), and a case changed (claimed, released, decided, reassigned). */
export const QUEUE_ALERT_EVENT = 'queue:alert';
export const QUEUE_CASE_CHANGED_EVENT = 'queue:case-changed';

/** Who hears a socket event. */
export type SocketAudience =
  /** Only the socket that has just connected. */
  | { to: 'connection' }
  /** Every socket of the session that was signed out, or of the person who was deactivated. */
  | { to: 'ended-session' }
  /** Every socket of one person (who started the work), as long as their role holds the capability. */
  | { to: 'person'; capability: Capability }
  /**
   * Every role holding the capability. `perCase`: the event is about one case,
   * and a role without `case:any-team` hears it only for a case its holder may
   * see (the shared queue, one of their teams, or assigned to them).
   */
  | { to: 'roles'; capability: Capability; perCase?: true };

/**
 * Every event the server pushes to consoles, and who hears it. The server
 * sends each event by this table (so an event cannot reach someone it does
 * not list), and the socket access test walks it, so a new event cannot ship
 * without a decision on who receives it. Payloads are small: consoles refetch
 * through the API, which applies the same rights.
 */
export const SOCKET_EVENTS = {
  [HELLO_EVENT]: { to: 'connection' },
  [SESSION_ENDED_EVENT]: { to: 'ended-session' },
  [QUEUE_ALERT_EVENT]: { to: 'roles', capability: 'queue:read', perCase: true },
  [QUEUE_CASE_CHANGED_EVENT]: { to: 'roles', capability: 'queue:read', perCase: true },
  [MODELS_CHANGED_EVENT]: { to: 'roles', capability: 'models:read' },
  [TRAINING_PROGRESS_EVENT]: { to: 'roles', capability: 'models:read' },
  [PROMOTION_CHANGED_EVENT]: { to: 'roles', capability: 'models:read' },
  [DRIFT_REPORTED_EVENT]: { to: 'roles', capability: 'models:read' },
  [BACKFILL_PROGRESS_EVENT]: { to: 'person', capability: 'data:backfill' },
} as const satisfies Record<string, SocketAudience>;

export type SocketEventName = keyof typeof SOCKET_EVENTS;
