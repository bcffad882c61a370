import { createReadStream } from 'node:fs';
import { stat as statFile } from 'node:fs/promises';
import { Readable } from 'node:stream';
import {
  DeleteObjectCommand, GetObjectCommand, HeadObjectCommand, PutObjectCommand, S3Client,
} from '@aws-sdk/client-s3';
import { Upload } from '@aws-sdk/lib-storage';
import { assertBlobKey, assertRange, BlobNotFoundError, rangePastEnd, type BlobStore, type PutOptions } from './blob-store.ts';

export interface S3StoreOptions {
  /** Endpoint URL of an S3-compatible service; omit for AWS itself. @default undefined */
  endpoint?: string;
  /** @default 'us-east-1' */
  region?: string;
  bucket: string;
  /** Omit both keys to use the SDK's default credential chain (instance role, env, profile). @default undefined */
  accessKeyId?: string;
  /** @default undefined */
  secretAccessKey?: string;
  /** `bucket` in the path instead of the host name: needed by most self-hosted S3-compatible servers. @default true */
  forcePathStyle?: boolean;
  /** Prefix put before every key, e.g. "gatepost/" to share a bucket. @default '' */
  prefix?: string;
}

/** Multipart part size: 8 MiB keeps a 2 GB upload at ~250 parts (S3 allows 10 000) and 4 × 8 MiB in memory. */
const PART_SIZE = 8 * 1024 * 1024;

function statusOf(err: unknown): number | undefined {
  return (err as { $metadata?: { httpStatusCode?: number } })?.$metadata?.httpStatusCode;
}

function isMissing(err: unknown): boolean {
  const name = (err as { name?: string })?.name;
  return name === 'NoSuchKey' || name === 'NotFound' || statusOf(err) === 404;
}

/**
 * Blobs as objects in an S3 bucket through @aws-sdk/client-s3. An S3 PUT (single or multipart) becomes visible
 * only when complete, so overwrites are atomic like the local store's rename.
 */
export class S3Store implements BlobStore {
  readonly client: S3Client;
  readonly bucket: string;
  private readonly prefix: string;

  constructor(options: S3StoreOptions) {
    if (!options.bucket) throw new TypeError('S3Store needs a bucket name (GATEPOST_S3_BUCKET)');
    this.bucket = options.bucket;
    this.prefix = options.prefix ?? '';
    const credentials = options.accessKeyId && options.secretAccessKey
      ? { accessKeyId: options.accessKeyId, secretAccessKey: options.secretAccessKey }
      : undefined;
    this.client = new S3Client({
      endpoint: options.endpoint,
      region: options.region ?? 'us-east-1',
      forcePathStyle: options.forcePathStyle ?? true,
      credentials,
      // Newer SDKs add CRC checksums (and aws-chunked trailers on streams) to every request; many S3-compatible
      // servers reject those. Only send them where S3 requires them; TLS and Content-Length still guard the bytes.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
    });
  }

  private objectKey(key: string): string {
    assertBlobKey(key);
    return this.prefix + key;
  }

  async putFile(key: string, localPath: string): Promise<void> {
    const Key = this.objectKey(key);
    const { size } = await statFile(localPath);
    if (size <= PART_SIZE) {
      // One request for small files; ContentLength lets the SDK stream the body without buffering it.
      await this.client.send(new PutObjectCommand({ Bucket: this.bucket, Key, Body: createReadStream(localPath), ContentLength: size }));
      return;
    }
    const upload = new Upload({
      client: this.client,
      params: { Bucket: this.bucket, Key, Body: createReadStream(localPath) },
      partSize: PART_SIZE,
      queueSize: 4,
      leavePartsOnError: false,
    });
    await upload.done();
  }

  // An S3 PUT is durable once answered: PutOptions' `sync: false` changes nothing here, and there is no sync().
  async putBytes(key: string, bytes: Uint8Array, _options?: PutOptions): Promise<void> {
    await this.client.send(new PutObjectCommand({ Bucket: this.bucket, Key: this.objectKey(key), Body: bytes, ContentLength: bytes.byteLength }));
  }

  openRead(key: string): Readable {
    const Key = this.objectKey(key);
    const { client, bucket } = this;
    async function* chunks() {
      let body;
      try {
        body = (await client.send(new GetObjectCommand({ Bucket: bucket, Key }))).Body as Readable | undefined;
      } catch (err) {
        throw isMissing(err) ? new BlobNotFoundError(key, { cause: err }) : err;
      }
      if (!body) return;
      for await (const chunk of body) yield chunk as Buffer;
    }
    return Readable.from(chunks(), { objectMode: false });
  }

  async readRange(key: string, offset: number, length: number): Promise<Uint8Array> {
    assertRange(offset, length);
    const Key = this.objectKey(key);
    if (length === 0) {
      if (!(await this.stat(key))) throw new BlobNotFoundError(key);
      return new Uint8Array(0);
    }
    let bytes: Uint8Array;
    try {
      const res = await this.client.send(
        new GetObjectCommand({ Bucket: this.bucket, Key, Range: `bytes=${offset}-${offset + length - 1}` }),
      );
      bytes = await res.Body!.transformToByteArray();
    } catch (err) {
      if (isMissing(err)) throw new BlobNotFoundError(key, { cause: err });
      if ((err as { name?: string }).name === 'InvalidRange' || statusOf(err) === 416) {
        throw rangePastEnd(key, offset, length, (await this.stat(key))?.size ?? 0);
      }
      throw err;
    }
    // S3 answers a range that runs past the end with the bytes it has; a short answer is the caller's error.
    if (bytes.byteLength !== length) throw rangePastEnd(key, offset, length, offset + bytes.byteLength);
    // A fresh, 0-offset buffer so callers can view it as Float32Array.
    return bytes.byteOffset === 0 && bytes.buffer.byteLength === length ? bytes : bytes.slice();
  }

  async stat(key: string): Promise<{ size: number } | null> {
    try {
      const res = await this.client.send(new HeadObjectCommand({ Bucket: this.bucket, Key: this.objectKey(key) }));
      return { size: res.ContentLength ?? 0 };
    } catch (err) {
      if (isMissing(err)) return null;
      throw err;
    }
  }

  async exists(key: string): Promise<boolean> {
    return (await this.stat(key)) !== null;
  }

  async delete(key: string): Promise<void> {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.bucket, Key: this.objectKey(key) }));
  }

  /** Closes the client's sockets (tests, shutdown). */
  close(): void {
    this.client.destroy();
  }
}
