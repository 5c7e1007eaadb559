import { mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createDiskStorage, createMemoryStorage, StoredFileMissing } from './storage';

describe('disk storage', () => {
  it('stores under generated names and reads back the same bytes', async () => {
    const root = mkdtempSync(join(tmpdir(), 'coilpath-store-'));
    const s = createDiskStorage(root);
    const key = await s.put(Buffer.from('hello'), { contentType: 'text/plain' });
    expect(key).toMatch(/^[0-9a-f]{2}\/[0-9a-f-]{36}$/);
    expect((await s.get(key)).toString()).toBe('hello');
    expect(readdirSync(join(root, key.slice(0, 2)))).toEqual([key.slice(3)]);
    await s.remove(key);
    await expect(s.get(key)).rejects.toBeInstanceOf(StoredFileMissing);
  });

  it('a well-formed key with nothing stored under it is StoredFileMissing, on disk and in memory', async () => {
    const key = 'ab/ab000000-0000-4000-8000-000000000000';
    for (const s of [createDiskStorage(mkdtempSync(join(tmpdir(), 'coilpath-store-'))), createMemoryStorage()]) {
      const err = await s.get(key).catch((e: unknown) => e);
      expect(err).toBeInstanceOf(StoredFileMissing);
      expect((err as StoredFileMissing).key).toBe(key);
    }
  });

  it('refuses keys that are not its own (path traversal)', async () => {
    const s = createDiskStorage(mkdtempSync(join(tmpdir(), 'coilpath-store-')));
    for (const bad of ['../../etc/passwd', 'ab/../../x', '/etc/passwd', 'ab/not-a-uuid']) {
      const err = await s.get(bad).catch((e: unknown) => e);
      expect(err, bad).not.toBeInstanceOf(StoredFileMissing);
      expect((err as Error).message, bad).toBe('Bad storage key');
    }
  });
});
