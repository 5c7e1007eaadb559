import { randomUUID } from 'node:crypto';
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import { join } from 'node:path';
import { createDiskStorage, keyPattern, StoredFileMissing, type Storage } from './storage';

/**
 * Where an S3-compatible object store keeps Coilpath's files (`S3_*` variables): the endpoint (`S3_URL`; none
 * for Amazon S3 itself), the bucket, the region, path-style addressing (`http://host/bucket/key`, as MinIO
 * and local fakes need) and the credentials (none: the SDK's usual chain — environment, profile, instance role).
 */
export interface S3Settings {
  endpoint: string | null;
  bucket: string;
  region: string;
  pathStyle: boolean;
  credentials?: { accessKeyId: string; secretAccessKey: string } | undefined;
}

/** What a backup records about an object store: where the files are (never the credentials). */
export const describeS3 = (s: S3Settings) => ({ kind: 's3' as const, endpoint: s.endpoint, bucket: s.bucket, region: s.region });

const missingObject = (e: unknown) =>
  (e instanceof S3ServiceException && (e.name === 'NoSuchKey' || e.name === 'NotFound' || e.$metadata.httpStatusCode === 404)) ||
  (e as { name?: string })?.name === 'NoSuchKey';

/**
 * Files in an S3-compatible bucket, behind the same interface as the disk: keys `ab/<uuid>` generated here,
 * stored as objects of that name; an object that is gone is `StoredFileMissing` (the routes answer 410).
 * Several API processes share the bucket without a network file system.
 */
export function createS3Storage(settings: S3Settings): Storage & { client: S3Client; settings: S3Settings; check(): Promise<void> } {
  const client = new S3Client({
    region: settings.region,
    ...(settings.endpoint ? { endpoint: settings.endpoint } : {}),
    forcePathStyle: settings.pathStyle,
    ...(settings.credentials ? { credentials: settings.credentials } : {}),
  });
  const Bucket = settings.bucket;
  const checked = (key: string) => {
    if (!keyPattern.test(key)) throw new Error('Bad storage key');
    return key;
  };
  return {
    client,
    settings,
    /** Fails with a clear message when the bucket cannot be reached (wrong address, name or credentials). */
    async check() {
      try {
        await client.send(new HeadBucketCommand({ Bucket }));
      } catch (e) {
        const status = (e as S3ServiceException).$metadata?.httpStatusCode;
        const why =
          status === 404
            ? 'it does not exist'
            : status === 403
              ? 'access was refused (check S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY)'
              : (e as Error).message;
        throw new Error(`The S3 bucket ${Bucket}${settings.endpoint ? ` at ${settings.endpoint}` : ''} cannot be used: ${why}.`, {
          cause: e,
        });
      }
    },
    async put(content, meta) {
      const id = randomUUID();
      const key = `${id.slice(0, 2)}/${id}`;
      await client.send(
        new PutObjectCommand({ Bucket, Key: key, Body: content, ContentType: meta.contentType, ContentLength: content.length }),
      );
      return key;
    },
    async get(key) {
      try {
        const out = await client.send(new GetObjectCommand({ Bucket, Key: checked(key) }));
        if (!out.Body) throw new StoredFileMissing(key);
        return Buffer.from(await out.Body.transformToByteArray());
      } catch (e) {
        if (missingObject(e)) throw new StoredFileMissing(key);
        throw e;
      }
    },
    async remove(key) {
      await client.send(new DeleteObjectCommand({ Bucket, Key: checked(key) }));
    },
  };
}

/**
 * The object store the environment names, or null (files on disk). Refuses half a configuration: `S3_URL`
 * without `S3_BUCKET`, or a key id without its secret.
 */
export function s3SettingsFromEnv(env: {
  S3_URL?: string | undefined;
  S3_BUCKET?: string | undefined;
  S3_REGION: string;
  S3_ACCESS_KEY_ID?: string | undefined;
  S3_SECRET_ACCESS_KEY?: string | undefined;
  S3_PATH_STYLE?: 'true' | 'false' | undefined;
}): S3Settings | null {
  if (!env.S3_BUCKET) {
    if (env.S3_URL || env.S3_ACCESS_KEY_ID || env.S3_SECRET_ACCESS_KEY)
      throw new Error('Bad configuration:\nS3_BUCKET: set it too (S3_URL or S3 credentials are set without a bucket)');
    return null;
  }
  if (Boolean(env.S3_ACCESS_KEY_ID) !== Boolean(env.S3_SECRET_ACCESS_KEY)) {
    throw new Error(
      'Bad configuration:\nS3_ACCESS_KEY_ID, S3_SECRET_ACCESS_KEY: set both, or neither (the SDK then finds credentials itself)',
    );
  }
  return {
    endpoint: env.S3_URL ?? null,
    bucket: env.S3_BUCKET,
    region: env.S3_REGION,
    pathStyle: env.S3_PATH_STYLE ? env.S3_PATH_STYLE === 'true' : Boolean(env.S3_URL),
    credentials:
      env.S3_ACCESS_KEY_ID && env.S3_SECRET_ACCESS_KEY
        ? { accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY }
        : undefined,
  };
}

/**
 * The storage a server (or a backup) uses: the bucket `S3_*` names, checked before the server answers, or
 * `<data dir>/files`. `where` says which, for the start-up message.
 */
export async function openStorage(
  env: Parameters<typeof s3SettingsFromEnv>[0],
  dataDir: string,
): Promise<{ storage: Storage; where: string; s3: S3Settings | null }> {
  const s3 = s3SettingsFromEnv(env);
  if (!s3) return { storage: createDiskStorage(join(dataDir, 'files')), where: join(dataDir, 'files'), s3 };
  const storage = createS3Storage(s3);
  await storage.check();
  return { storage, where: `S3 bucket ${s3.bucket}${s3.endpoint ? ` at ${s3.endpoint}` : ` (${s3.region})`}`, s3 };
}
