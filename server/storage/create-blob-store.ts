import path from 'node:path';
import type { Config } from '../config.ts';
import type { BlobStore } from './blob-store.ts';
import { LocalDiskStore } from './local-disk-store.ts';
import { S3Store } from './s3-store.ts';

type StorageConfig = Pick<
  Config,
  'storage' | 'dataDir' | 's3Endpoint' | 's3Region' | 's3Bucket' | 's3AccessKeyId' | 's3SecretAccessKey' | 's3ForcePathStyle'
>;

/** The blob store the configuration asks for: local disk under `<dataDir>/blobs` (default) or an S3 bucket. */
export function createBlobStore(config: StorageConfig): BlobStore {
  if (config.storage === 's3') {
    return new S3Store({
      endpoint: config.s3Endpoint,
      region: config.s3Region,
      bucket: config.s3Bucket!,
      accessKeyId: config.s3AccessKeyId,
      secretAccessKey: config.s3SecretAccessKey,
      forcePathStyle: config.s3ForcePathStyle,
    });
  }
  return new LocalDiskStore(path.join(config.dataDir, 'blobs'));
}
