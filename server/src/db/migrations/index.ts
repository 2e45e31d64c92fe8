import type { Migration } from '../migrator';
import { m0001 } from './0001-users-sessions-audit';
import { m0002 } from './0002-pipeline';
import { m0003 } from './0003-backfill-imports';
import { m0004 } from './0004-case-work';
import { m0005 } from './0005-supervision';
import { m0006 } from './0006-model-lifecycle';
import { m0007 } from './0007-queue-sort-indexes';
import { m0008 } from './0008-case-teams';

/** Every migration, in order. Add new ones at the end; never edit a shipped one. */
export const migrations: Migration[] = [m0001, m0002, m0003, m0004, m0005, m0006, m0007, m0008];
