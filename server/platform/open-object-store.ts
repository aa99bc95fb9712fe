import type { Config } from './config';
import { DiskStore, type ObjectStore } from './object-store';
import { S3Store } from './object-store-s3';

/** The store the settings ask for: an S3-compatible bucket when S3_BUCKET is set, else UPLOADS_DIR. */
export function openObjectStore(config: Config): ObjectStore {
  if (config.S3_BUCKET) {
    return new S3Store({
      bucket: config.S3_BUCKET,
      endpoint: config.S3_ENDPOINT,
      region: config.S3_REGION,
      accessKeyId: config.S3_ACCESS_KEY_ID,
      secretAccessKey: config.S3_SECRET_ACCESS_KEY,
      // S3-compatible stores on their own address mostly want bucket-in-path addresses.
      forcePathStyle: config.S3_FORCE_PATH_STYLE ?? Boolean(config.S3_ENDPOINT),
      prefix: config.S3_PREFIX,
    });
  }
  return new DiskStore(config.UPLOADS_DIR);
}
