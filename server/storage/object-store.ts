import { Readable } from 'node:stream';
import {
  CreateBucketCommand,
  DeleteObjectsCommand,
  GetObjectCommand,
  HeadBucketCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import { getSignedUrl } from '@aws-sdk/s3-request-presigner';
import { unavailable } from '../lib/errors.js';

export interface ObjectStoreConfig {
  endpoint: string;
  region: string;
  bucket: string;
  accessKeyId: string;
  secretAccessKey: string;
}

/** The one thin module in front of object storage. Talks S3 to any endpoint (the local fake or a real service). */
export interface ObjectStore {
  readonly bucket: string;
  put(key: string, body: Buffer, contentType: string): Promise<void>;
  get(key: string): Promise<Buffer>;
  stream(key: string): Promise<{ body: Readable; contentType?: string; contentLength?: number }>;
  /** Deletes keys; missing keys are not an error. */
  remove(keys: string[]): Promise<void>;
  list(prefix: string): Promise<string[]>;
  /** Keys under a prefix with their sizes in bytes. */
  listWithSizes(prefix: string): Promise<{ key: string; size: number }[]>;
  presign(key: string, seconds: number): Promise<string>;
  ensureBucket(): Promise<void>;
  /** Resolves when the bucket answers (readiness). */
  ping(): Promise<void>;
}

/** A storage failure the user should hear about as "try again later", not as a bug. */
function wrap<T>(what: string, fn: () => Promise<T>): Promise<T> {
  return fn().catch((err: unknown) => {
    if (err instanceof S3ServiceException && err.$metadata?.httpStatusCode === 404) throw err;
    const code = (err as { code?: string; name?: string }).code ?? (err as { name?: string }).name;
    if (err instanceof S3ServiceException || ['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'TimeoutError'].includes(String(code))) {
      throw unavailable(`Photo and document storage is not reachable (${what}). Nothing was saved; please try again shortly.`);
    }
    throw err;
  });
}

export function createObjectStore(cfg: ObjectStoreConfig): ObjectStore {
  // The SDK version is pinned for Node 20 on purpose; its notice about future releases needing Node 22 is known.
  process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= 'true';
  const client = new S3Client({
    endpoint: cfg.endpoint,
    region: cfg.region,
    forcePathStyle: true,
    credentials: { accessKeyId: cfg.accessKeyId, secretAccessKey: cfg.secretAccessKey },
    // Without these the SDK frames streamed uploads with checksum chunks that S3 fakes store verbatim.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
    maxAttempts: 2,
  });
  const Bucket = cfg.bucket;
  const listWithSizes = (prefix: string) =>
    wrap('list', async () => {
      const out: { key: string; size: number }[] = [];
      let token: string | undefined;
      do {
        const page = await client.send(new ListObjectsV2Command({ Bucket, Prefix: prefix, ContinuationToken: token }));
        for (const o of page.Contents ?? []) if (o.Key) out.push({ key: o.Key, size: o.Size ?? 0 });
        token = page.IsTruncated ? page.NextContinuationToken : undefined;
      } while (token);
      return out;
    });
  return {
    bucket: Bucket,
    put: (key, body, contentType) =>
      wrap('write', async () => {
        await client.send(new PutObjectCommand({ Bucket, Key: key, Body: body, ContentType: contentType, ContentLength: body.length }));
      }),
    get: (key) =>
      wrap('read', async () => {
        const out = await client.send(new GetObjectCommand({ Bucket, Key: key }));
        return Buffer.from(await out.Body!.transformToByteArray());
      }),
    stream: (key) =>
      wrap('read', async () => {
        const out = await client.send(new GetObjectCommand({ Bucket, Key: key }));
        return { body: out.Body as Readable, contentType: out.ContentType, contentLength: out.ContentLength };
      }),
    remove: (keys) =>
      wrap('delete', async () => {
        for (let i = 0; i < keys.length; i += 1000) {
          const batch = keys.slice(i, i + 1000);
          if (batch.length) await client.send(new DeleteObjectsCommand({ Bucket, Delete: { Objects: batch.map((Key) => ({ Key })), Quiet: true } }));
        }
      }),
    list: async (prefix) => (await listWithSizes(prefix)).map((o) => o.key),
    listWithSizes,
    presign: (key, seconds) => getSignedUrl(client, new GetObjectCommand({ Bucket, Key: key }), { expiresIn: seconds }),
    ping: () =>
      wrap('bucket', async () => {
        await client.send(new HeadBucketCommand({ Bucket }));
      }),
    ensureBucket: () =>
      wrap('bucket', async () => {
        try {
          await client.send(new HeadBucketCommand({ Bucket }));
        } catch {
          await client.send(new CreateBucketCommand({ Bucket }));
        }
      }),
  };
}
