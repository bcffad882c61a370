import path from 'node:path';
import { Readable } from 'node:stream';
import type { Config } from '../config.ts';
import type { BlobStore, PutOptions } from './blob-store.ts';
import { LocalDiskStore } from './local-disk-store.ts';
import type { S3Store, S3StoreOptions } from './s3-store.ts';

type StorageConfig = Pick<
  Config,
  'storage' | 'dataDir' | 's3Endpoint' | 's3Region' | 's3Bucket' | 's3AccessKeyId' | 's3SecretAccessKey' | 's3ForcePathStyle'
>;

/** The blob store the configuration asks for: local disk under `<dataDir>/blobs` (default) or an S3 bucket. */
export function createBlobStore(config: StorageConfig): BlobStore {
  if (config.storage === 's3') {
    if (!config.s3Bucket) throw new TypeError('S3Store needs a bucket name (GATEPOST_S3_BUCKET)');
    return new LazyS3Store({
      endpoint: config.s3Endpoint,
      region: config.s3Region,
      bucket: config.s3Bucket,
      accessKeyId: config.s3AccessKeyId,
      secretAccessKey: config.s3SecretAccessKey,
      forcePathStyle: config.s3ForcePathStyle,
    });
  }
  return new LocalDiskStore(path.join(config.dataDir, 'blobs'));
}

/**
 * An S3Store whose module (and the AWS SDK under it) is loaded on first use. The SDK takes 0.3–0.8 s of CPU to load
 * (measured on the 2-core lab machine); loaded up front it delayed the start of the API server, the worker and each
 * processor thread of every installation, S3 or not.
 */
class LazyS3Store implements BlobStore {
  private store: Promise<S3Store> | null = null;

  constructor(private readonly options: S3StoreOptions) {}

  private get(): Promise<S3Store> {
    this.store ??= import('./s3-store.ts').then(({ S3Store }) => new S3Store(this.options));
    return this.store;
  }

  async putFile(key: string, localPath: string): Promise<void> {
    return (await this.get()).putFile(key, localPath);
  }

  async putBytes(key: string, bytes: Uint8Array, options?: PutOptions): Promise<void> {
    return (await this.get()).putBytes(key, bytes, options);
  }

  openRead(key: string): Readable {
    const get = () => this.get();
    async function* chunks() {
      for await (const chunk of (await get()).openRead(key)) yield chunk as Buffer;
    }
    return Readable.from(chunks(), { objectMode: false });
  }

  async readRange(key: string, offset: number, length: number): Promise<Uint8Array> {
    return (await this.get()).readRange(key, offset, length);
  }

  async stat(key: string): Promise<{ size: number } | null> {
    return (await this.get()).stat(key);
  }

  async exists(key: string): Promise<boolean> {
    return (await this.get()).exists(key);
  }

  async delete(key: string): Promise<void> {
    return (await this.get()).delete(key);
  }
}
