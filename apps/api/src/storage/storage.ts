import { randomUUID } from 'node:crypto';
import { mkdir, readFile, rm, writeFile } from 'node:fs/promises';
import { join, resolve, sep } from 'node:path';

/** File storage behind a small interface (DESIGN §7): names are generated, never the client's. */
export interface Storage {
  put(content: Buffer, meta: { contentType: string }): Promise<string>;
  get(key: string): Promise<Buffer>;
  remove(key: string): Promise<void>;
}

const keyPattern = /^[0-9a-f]{2}\/[0-9a-f-]{36}$/;

export function createDiskStorage(root: string): Storage {
  const base = resolve(root);
  const pathFor = (key: string) => {
    if (!keyPattern.test(key)) throw new Error('Bad storage key');
    const p = resolve(join(base, key));
    if (!p.startsWith(base + sep)) throw new Error('Bad storage key');
    return p;
  };
  return {
    async put(content) {
      const id = randomUUID();
      const key = `${id.slice(0, 2)}/${id}`;
      await mkdir(join(base, id.slice(0, 2)), { recursive: true });
      await writeFile(pathFor(key), content, { flag: 'wx' });
      return key;
    },
    get: async (key) => readFile(pathFor(key)),
    remove: async (key) => rm(pathFor(key), { force: true }),
  };
}

/** In-memory storage for tests. */
export function createMemoryStorage(): Storage {
  const files = new Map<string, Buffer>();
  return {
    async put(content) {
      const id = randomUUID();
      const key = `${id.slice(0, 2)}/${id}`;
      files.set(key, Buffer.from(content));
      return key;
    },
    async get(key) {
      const f = files.get(key);
      if (!f) throw Object.assign(new Error('No such file'), { code: 'ENOENT' });
      return f;
    },
    async remove(key) {
      files.delete(key);
    },
  };
}
