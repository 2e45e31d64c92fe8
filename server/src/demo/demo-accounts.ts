import type { Role } from '@shared/auth/roles';

/** The invented staff of the demo issuer, one account per role. */
export const DEMO_ACCOUNTS: { email: string; displayName: string; role: Role }[] = [
  { email: 'investigator@demo.test', displayName: 'Ines Varga', role: 'investigator' },
  { email: 'supervisor@demo.test', displayName: 'Sol Brennan', role: 'supervisor' },
  { email: 'scientist@demo.test', displayName: 'Dara Okafor', role: 'data_scientist' },
  { email: 'admin@demo.test', displayName: 'Ari Lindqvist', role: 'admin' },
];

/** The local demo's upstream API key (demo and test modes only; a production start refuses it). */
export const DEMO_API_KEY = process.env.EDGECASE_DEMO_API_KEY ?? 'edgecase-demo-key';
