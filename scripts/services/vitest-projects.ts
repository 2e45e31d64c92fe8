/**
 * The Vitest projects of vite.config.ts, in the order `npm test` runs them. A project added there
 * must be added here too, or `npm test` would leave it out: tests/unit/vitest-projects.test.ts
 * compares the two lists.
 */
export const VITEST_PROJECTS = ['unit', 'client', 'integration', 'reliability'] as const;
