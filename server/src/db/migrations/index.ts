import type { Migration } from '../migrator';
import { m0001 } from './0001-users-sessions-audit';

/** Every migration, in order. Add new ones at the end; never edit a shipped one. */
export const migrations: Migration[] = [m0001];
