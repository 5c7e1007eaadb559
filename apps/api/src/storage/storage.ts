import { randomUUID } from 'node:crypto';
import { mkdir, readFile, rm, writeFile } from 'node:fs/promises';
import { join, resolve, sep } from 'node:path';
import { fileMissing } from '../lib/errors';

/**
 * A stored file whose record exists but whose bytes are gone (deleted outside Coilpath, or a database
 * restored without its files). Routes answer it with 410 `file_missing`, never 500.
 */
export class StoredFileMissing extends Error {
  constructor(readonly key: string) {
    super(`The stored file ${key} is missing.`);
    this.name = 'StoredFileMissing';
  }
}

/** File storage behind a small interface (docs/DESIGN.md §7): names are generated, never the client's. */
export interface Storage {
  put(content: Buffer, meta: { contentType: string }): Promise<string>;
  /** The file's bytes; `StoredFileMissing` when the key is well formed but nothing is stored under it. */
  get(key: string): Promise<Buffer>;
  remove(key: string): Promise<void>;
}

/**
 * A stored file for a route that serves it: a missing file answers 410 `file_missing` naming `what`
 * (a photo, an e-mail attachment…); the error's `cause` keeps the key, which the error handler logs for the
 * administrator with the request's id.
 */
export async function readStoredFile(storage: Storage, key: string, what: string): Promise<Buffer> {
  try {
    return await storage.get(key);
  } catch (e) {
    if (!(e instanceof StoredFileMissing)) throw e;
    throw Object.assign(fileMissing(what), { cause: e });
  }
}

export const keyPattern = /^[0-9a-f]{2}\/[0-9a-f-]{36}$/;

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
    async get(key) {
      const path = pathFor(key);
      try {
        return await readFile(path);
      } catch (e) {
        if ((e as NodeJS.ErrnoException).code === 'ENOENT') throw new StoredFileMissing(key);
        throw e;
      }
    },
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
      if (!f) throw new StoredFileMissing(key);
      return f;
    },
    async remove(key) {
      files.delete(key);
    },
  };
}
