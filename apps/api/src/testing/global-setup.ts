/**
 * Vitest global setup of the `api` and `tests` projects (vite.config.ts): migrates one template database
 * per run (see `test-template.ts`) and provides it to the test files, whose `openTestDatabase()` clones it
 * instead of migrating a database of their own. Both projects share the one template: it is kept on
 * `globalThis` (the projects load this file separately, in the one Vitest process) and removed when the
 * last project tears down.
 */
import type { TestProject } from 'vitest/node';
import { createTestTemplate, type TestTemplate } from './test-template';

interface Shared {
  made: Promise<{ template: TestTemplate; remove(): Promise<void> }>;
  users: number;
}

const KEY = Symbol.for('coilpath.testTemplate');
const holder = globalThis as typeof globalThis & { [KEY]?: Shared };

export default async function setup(project: TestProject) {
  const shared = (holder[KEY] ??= { made: createTestTemplate(process.env.DATABASE_URL), users: 0 });
  shared.users++;
  try {
    project.provide('coilpathTestTemplate', (await shared.made).template);
  } catch (err) {
    shared.users--;
    if (shared.users === 0) delete holder[KEY];
    throw err;
  }
  return async () => {
    shared.users--;
    if (shared.users > 0) return;
    delete holder[KEY];
    await (await shared.made).remove();
  };
}
