/**
 * Staff roles and what each may do. The server enforces these on every route;
 * the client reads the same table only to hide what the server would refuse.
 */
export const ROLES = ['investigator', 'supervisor', 'data_scientist', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  investigator: 'Investigator',
  supervisor: 'Supervisor',
  data_scientist: 'Data scientist',
  admin: 'Admin',
};

/**
 * Capabilities are the unit of access control. A route or socket event names
 * one capability; a role holds a set of them.
 */
export const CAPABILITIES = {
  'queue:read': ['investigator', 'supervisor'],
  'case:work': ['investigator', 'supervisor'],
  'case:reassign': ['supervisor'],
  /** Every team's cases; without it an investigator sees the shared queue, their teams' cases and cases assigned to them. */
  'case:any-team': ['supervisor'],
  'board:read': ['supervisor'],
  'approval:decide': ['supervisor'],
  'settings:alerting': ['supervisor'],
  'models:read': ['data_scientist', 'supervisor'],
  'models:train': ['data_scientist'],
  'models:promote': ['data_scientist'],
  /** Four-eyes: a supervisor approves a promotion or rollback a data scientist requested. */
  'models:approve': ['supervisor'],
  'audit:read': ['supervisor', 'admin'],
  'users:manage': ['admin'],
  'apikeys:manage': ['admin'],
  'demo:control': ['admin'],
  'data:backfill': ['data_scientist', 'admin'],
  'mail:read-demo': ['investigator', 'supervisor', 'data_scientist', 'admin'],
} as const satisfies Record<string, readonly Role[]>;

export type Capability = keyof typeof CAPABILITIES;

export function can(role: Role, capability: Capability): boolean {
  return (CAPABILITIES[capability] as readonly Role[]).includes(role);
}

/** The first screen each role lands on after sign-in. */
export const ROLE_HOME: Record<Role, string> = {
  investigator: '/queue',
  supervisor: '/board',
  data_scientist: '/models',
  admin: '/admin',
};
