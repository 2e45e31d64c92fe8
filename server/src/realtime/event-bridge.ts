import type { DomainEvent } from '../events/event-bus';
import { DRIFT_REPORTED_EVENT, PROMOTION_CHANGED_EVENT, TRAINING_PROGRESS_EVENT } from '@shared/api/models';
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
    // The Models screen: live training progress, promotion requests and drift reports.
    case 'training.progress':
      hub.io.to([rooms.role('data_scientist'), rooms.role('supervisor')]).emit(TRAINING_PROGRESS_EVENT, e);
      break;
    case 'promotion.changed':
      hub.io.to([rooms.role('data_scientist'), rooms.role('supervisor')]).emit(PROMOTION_CHANGED_EVENT, e);
      break;
    case 'drift.reported':
      hub.io.to([rooms.role('data_scientist'), rooms.role('supervisor')]).emit(DRIFT_REPORTED_EVENT, e);
      break;
    default:
      break;
  }
}
