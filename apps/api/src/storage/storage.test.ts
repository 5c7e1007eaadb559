import { mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createDiskStorage } from './storage';

describe('disk storage', () => {
  it('stores under generated names and reads back the same bytes', async () => {
    const root = mkdtempSync(join(tmpdir(), 'coilpath-store-'));
    const s = createDiskStorage(root);
    const key = await s.put(Buffer.from('hello'), { contentType: 'text/plain' });
    expect(key).toMatch(/^[0-9a-f]{2}\/[0-9a-f-]{36}$/);
    expect((await s.get(key)).toString()).toBe('hello');
    expect(readdirSync(join(root, key.slice(0, 2)))).toEqual([key.slice(3)]);
    await s.remove(key);
    await expect(s.get(key)).rejects.toThrow();
  });

  it('refuses keys that are not its own (path traversal)', async () => {
    const s = createDiskStorage(mkdtempSync(join(tmpdir(), 'coilpath-store-')));
    for (const bad of ['../../etc/passwd', 'ab/../../x', '/etc/passwd', 'ab/not-a-uuid']) {
      await expect(s.get(bad), bad).rejects.toThrow('Bad storage key');
    }
  });
});
