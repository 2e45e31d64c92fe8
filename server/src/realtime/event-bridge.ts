import type { DomainEvent } from '../events/event-bus';
import { rooms, type SocketHub } from './socket-hub';

/**
 * Which consoles hear which domain events. Queue changes go to the people who
 * work the queue (investigators and supervisors); scored-transaction events are
 * not pushed (too many, and no screen needs them one by one).
 */
export function bridgeEventsToSockets(hub: SocketHub, e: DomainEvent): void {
  switch (e.type) {
    case 'case.alerted':
      hub.io.to([rooms.role('investigator'), rooms.role('supervisor')]).emit('queue:alert', e);
      break;
    case 'case.changed':
      hub.io.to([rooms.role('investigator'), rooms.role('supervisor')]).emit('queue:case-changed', e);
      break;
    case 'model.changed':
      hub.io.to([rooms.role('data_scientist'), rooms.role('supervisor')]).emit('models:changed', e);
      break;
    default:
      break;
  }
}
