import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import S3rver from 's3rver';
import { GetObjectCommand, ListObjectsV2Command, S3Client } from '@aws-sdk/client-s3';

/**
 * A local S3-compatible server (s3rver) on a free port, keeping its objects in a temporary folder,
 * with one bucket made ahead. `env` holds the server settings that point Crowntip at it.
 */
export interface FakeS3 {
  endpoint: string;
  bucket: string;
  env: Record<string, string>;
  /** Keys in the bucket, sorted. */
  keys: (prefix?: string) => Promise<string[]>;
  read: (key: string) => Promise<Buffer>;
  /** Stops answering (connections refused), keeping the objects; `start` answers again on the same port. */
  stop: () => Promise<void>;
  start: () => Promise<void>;
  remove: () => Promise<void>;
}

export async function startFakeS3(bucket = 'crowntip-test'): Promise<FakeS3> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-s3-'));
  let port = 0;
  let server: { run(): Promise<{ port: number }>; close(): Promise<void> } | null = null;
  const start = async () => {
    if (server) return;
    server = new S3rver({ port, address: '127.0.0.1', directory: dir, silent: true, configureBuckets: [{ name: bucket }] });
    port = (await server!.run()).port;
  };
  await start();
  const endpoint = `http://127.0.0.1:${port}`;
  const credentials = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' };
  const client = new S3Client({ endpoint, region: 'us-east-1', forcePathStyle: true, credentials, requestChecksumCalculation: 'WHEN_REQUIRED', responseChecksumValidation: 'WHEN_REQUIRED' });
  return {
    endpoint,
    bucket,
    env: { S3_BUCKET: bucket, S3_ENDPOINT: endpoint, S3_REGION: 'us-east-1', S3_ACCESS_KEY_ID: credentials.accessKeyId, S3_SECRET_ACCESS_KEY: credentials.secretAccessKey },
    keys: async (prefix = '') => {
      const out = await client.send(new ListObjectsV2Command({ Bucket: bucket, Prefix: prefix }));
      return (out.Contents ?? []).map((o) => o.Key!).sort();
    },
    read: async (key) => Buffer.from(await (await client.send(new GetObjectCommand({ Bucket: bucket, Key: key }))).Body!.transformToByteArray()),
    stop: async () => {
      await server?.close();
      server = null;
    },
    start,
    remove: async () => {
      await server?.close();
      client.destroy();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
