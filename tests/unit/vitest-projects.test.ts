import { describe, expect, it } from 'vitest';
import config from '../../vite.config';
import { VITEST_PROJECTS } from '../../scripts/services/vitest-projects';

describe('npm test runs every Vitest project', () => {
  it('the runner knows each project of vite.config.ts, and no other', () => {
    const projects = (config.test?.projects ?? []) as { test?: { name?: string } }[];
    const names = projects.map((p) => p.test?.name);
    expect(names.length).toBeGreaterThan(0);
    expect([...names].sort()).toEqual([...VITEST_PROJECTS].sort());
  });
});
