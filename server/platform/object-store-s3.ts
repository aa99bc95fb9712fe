import type { Readable } from 'node:stream';
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  HeadObjectCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
} from '@aws-sdk/client-s3';
import { HttpError } from './errors';
import { checkKey, readAll, readError, type ObjectStore, type StoredObject } from './object-store';

export interface S3Settings {
  bucket: string;
  /** An S3-compatible store's address; unset: AWS's own endpoint for the region. */
  endpoint?: string;
  region: string;
  /** Unset: the SDK's usual credential sources (AWS_ACCESS_KEY_ID…, an instance role). */
  accessKeyId?: string;
  secretAccessKey?: string;
  forcePathStyle: boolean;
  /** Put before every key, e.g. "crowntip/" to share a bucket. */
  prefix: string;
}

const status = (err: unknown) => (err as { $metadata?: { httpStatusCode?: number } })?.$metadata?.httpStatusCode;
const isMissing = (err: unknown) => {
  const name = (err as { name?: string })?.name;
  return name === 'NoSuchKey' || name === 'NotFound' || status(err) === 404;
};

/** A failed write as the answer the user sees: 507 when the store says it is full, else 503. */
function writeError(err: unknown, what: string): HttpError {
  const full = status(err) === 507 || /StorageFull|QuotaExceeded/i.test((err as { name?: string })?.name ?? '');
  const e = full
    ? new HttpError('storage_full', `The file store is full, so ${what} was not saved. Nothing was kept; ask your administrator to free space, then send it again.`)
    : new HttpError('storage_unavailable', `The server cannot reach its file store just now, so ${what} was not saved. Nothing was kept; try again in a moment, and tell your administrator if it goes on.`);
  (e as Error).cause = err;
  return e;
}

/**
 * Files in one bucket of an S3-compatible store. A put is one PutObject, so a reader sees the old
 * object or the new one whole. Checksums are sent only where S3 requires them, which every
 * S3-compatible store accepts.
 */
export class S3Store implements ObjectStore {
  readonly kind = 's3' as const;
  private readonly client: S3Client;
  constructor(private readonly s: S3Settings) {
    this.client = new S3Client({
      region: s.region,
      endpoint: s.endpoint,
      forcePathStyle: s.forcePathStyle,
      credentials: s.accessKeyId && s.secretAccessKey ? { accessKeyId: s.accessKeyId, secretAccessKey: s.secretAccessKey } : undefined,
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
      maxAttempts: 3,
      // A store that does not answer must fail a request in seconds, not hang it.
      requestHandler: { connectionTimeout: 3000, requestTimeout: 30_000 },
    });
  }

  get where() {
    return `${this.s.endpoint ?? `s3.${this.s.region}`}/${this.s.bucket}/${this.s.prefix}`;
  }

  private key(key: string) {
    return this.s.prefix + checkKey(key);
  }

  async put(key: string, data: Buffer | Readable, { what, contentType }: { what: string; contentType?: string }): Promise<void> {
    // PutObject needs the length up front; uploads here are small (the upload limits), so a stream is read first.
    const Key = this.key(key);
    const body = Buffer.isBuffer(data) ? data : await readAll({ body: data, size: 0 });
    try {
      await this.client.send(new PutObjectCommand({ Bucket: this.s.bucket, Key, Body: body, ContentLength: body.length, ContentType: contentType }));
    } catch (err) {
      throw writeError(err, what);
    }
  }

  async get(key: string, what = 'the file'): Promise<StoredObject | null> {
    const Key = this.key(key);
    try {
      const out = await this.client.send(new GetObjectCommand({ Bucket: this.s.bucket, Key }));
      return { body: out.Body as Readable, size: out.ContentLength ?? 0 };
    } catch (err) {
      if (isMissing(err)) return null;
      throw readError(err, what);
    }
  }

  async delete(key: string): Promise<void> {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.s.bucket, Key: this.key(key) }));
  }

  async exists(key: string): Promise<boolean> {
    const Key = this.key(key);
    try {
      await this.client.send(new HeadObjectCommand({ Bucket: this.s.bucket, Key }));
      return true;
    } catch (err) {
      if (isMissing(err)) return false;
      throw readError(err, 'the file');
    }
  }

  async list(prefix: string): Promise<{ key: string; modified: Date }[]> {
    const out: { key: string; modified: Date }[] = [];
    let token: string | undefined;
    do {
      const page = await this.client.send(new ListObjectsV2Command({ Bucket: this.s.bucket, Prefix: this.s.prefix + prefix, ContinuationToken: token }));
      for (const o of page.Contents ?? []) if (o.Key) out.push({ key: o.Key.slice(this.s.prefix.length), modified: o.LastModified ?? new Date(0) });
      token = page.IsTruncated ? page.NextContinuationToken : undefined;
    } while (token);
    return out;
  }

  async health(): Promise<void> {
    try {
      await this.client.send(new HeadBucketCommand({ Bucket: this.s.bucket }));
    } catch (err) {
      const code = status(err) ?? (err as { code?: string }).code ?? (err as Error).name;
      throw new Error(status(err) === 404 ? `the bucket ${this.s.bucket} does not exist` : `the file store does not answer (${code})`);
    }
  }
}
