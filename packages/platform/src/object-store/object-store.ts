import type { Readable } from 'node:stream';
import {
  CreateBucketCommand,
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  HeadObjectCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';

export interface ObjectStoreConfig {
  /** Unset: the AWS endpoint of `region`. */
  endpoint?: string;
  bucket: string;
  region?: string;
  /** Both or neither; neither: the SDK's default credential chain (instance or task role, AWS_* variables). */
  accessKeyId?: string;
  secretAccessKey?: string;
  /** endpoint/bucket/key URLs (default, what most on-premises stores need); false: bucket.endpoint/key. */
  forcePathStyle?: boolean;
  /** Asked for on every object written; unset: the bucket's default encryption applies. */
  serverSideEncryption?: 'AES256' | 'aws:kms';
  /** The KMS key for `aws:kms`; unset: the account's AWS-managed key. */
  sseKmsKeyId?: string;
  /** Keys per ListObjectsV2 request in `listAll` (S3 answers at most 1000, the default); smaller only to test paging. */
  listPageSize?: number;
}

/** One object as a listing reports it. */
export interface ListedObject {
  key: string;
  size: number;
  lastModified: Date;
}

/** What a HEAD of one object tells without its bytes. */
export interface ObjectHead {
  size: number;
  contentType: string | undefined;
  metadata: Record<string, string>;
  /** Quoted as S3 sends it; the MD5 of the bytes only for single-part uploads without SSE-KMS. */
  etag: string | undefined;
  lastModified: Date | undefined;
}

// NOTE: the SDK warns on Node 20 at every start; the pinned release supports it.
process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= 'true';

/** The object store could not be reached or refused the request; retry later. */
export class ObjectStoreUnavailableError extends Error {}

/** The object does not exist (deleted, or never stored). */
export class ObjectMissingError extends Error {}

/** One listed object: its key, when it was written and its size. */
export interface StoredObject {
  key: string;
  lastModified: Date;
  sizeBytes: number;
}

/** Capture bytes in S3-compatible storage; keys are chosen by the caller. */
export class ObjectStore {
  private readonly client: S3Client;

  constructor(readonly config: ObjectStoreConfig) {
    const { accessKeyId, secretAccessKey } = config;
    this.client = new S3Client({
      region: config.region ?? 'us-east-1',
      ...(config.endpoint ? { endpoint: config.endpoint } : {}),
      forcePathStyle: config.forcePathStyle ?? true,
      ...(accessKeyId && secretAccessKey ? { credentials: { accessKeyId, secretAccessKey } } : {}),
      // NOTE: without these two a streamed upload is stored with aws-chunked framing inside.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
      maxAttempts: 2,
    });
  }

  /**
   * Readiness: the bucket answers a HEAD with these credentials.
   * @throws ObjectStoreUnavailableError for any failure, a missing bucket or refused credentials included
   */
  async ping(): Promise<void> {
    try {
      await this.client.send(new HeadBucketCommand({ Bucket: this.config.bucket }));
    } catch (error) {
      const status = error instanceof S3ServiceException ? ` (HTTP ${error.$metadata.httpStatusCode ?? '?'})` : '';
      throw new ObjectStoreUnavailableError(`bucket ${this.config.bucket} not reachable${status}: ${error instanceof Error ? error.name || error.message : String(error)}`);
    }
  }

  /** Creates the bucket when it does not exist yet. */
  async ensureBucket(): Promise<void> {
    await this.wrap(async () => {
      try {
        await this.client.send(new HeadBucketCommand({ Bucket: this.config.bucket }));
      } catch {
        await this.client.send(new CreateBucketCommand({ Bucket: this.config.bucket }));
      }
    });
  }

  /**
   * @param options.payloadSha256 the body's SHA-256 (hex) when the caller has it already (computed
   *   off the event loop): the request signature uses it instead of hashing the body here again
   */
  async put(key: string, body: Buffer | Uint8Array, contentType: string, metadata: Record<string, string> = {}, options: { payloadSha256?: string } = {}): Promise<void> {
    const command = this.putCommand(key, body, body.byteLength, contentType, metadata, options.payloadSha256);
    await this.wrap(() => this.client.send(command));
  }

  /**
   * Writes a stream of known length without holding it in memory (backups, restores). The SDK
   * never retries a stream body (it is consumed): a failure is thrown and the caller resumes.
   * @param payloadSha256 the body's SHA-256 (hex): the request is signed with it, since a stream cannot be hashed twice
   */
  async putStream(key: string, body: Readable, size: number, contentType: string, metadata: Record<string, string>, payloadSha256: string): Promise<void> {
    const command = this.putCommand(key, body, size, contentType, metadata, payloadSha256);
    await this.wrap(() => this.client.send(command));
  }

  private putCommand(key: string, body: Buffer | Uint8Array | Readable, size: number, contentType: string, metadata: Record<string, string>, payloadSha256: string | undefined): PutObjectCommand {
    const { serverSideEncryption, sseKmsKeyId } = this.config;
    const command = new PutObjectCommand({
      Bucket: this.config.bucket,
      Key: key,
      Body: body,
      ContentType: contentType,
      ContentLength: size,
      Metadata: metadata,
      ...(serverSideEncryption ? { ServerSideEncryption: serverSideEncryption } : {}),
      ...(serverSideEncryption === 'aws:kms' && sseKmsKeyId ? { SSEKMSKeyId: sseKmsKeyId } : {}),
    });
    if (payloadSha256) {
      command.middlewareStack.add(
        (next) => (args) => {
          (args.request as { headers: Record<string, string> }).headers['x-amz-content-sha256'] = payloadSha256;
          return next(args);
        },
        { step: 'build', name: 'earmarkKnownPayloadHash' },
      );
    }
    return command;
  }

  /** @throws ObjectMissingError when there is no such object; ObjectStoreUnavailableError when the store is down */
  async get(key: string): Promise<Buffer> {
    return this.wrap(async () => {
      const res = await this.client.send(new GetObjectCommand({ Bucket: this.config.bucket, Key: key })).catch((error: unknown) => {
        if (error instanceof S3ServiceException && (error.name === 'NoSuchKey' || error.$metadata.httpStatusCode === 404)) throw new ObjectMissingError(`no object ${key}`);
        throw error;
      });
      const chunks: Buffer[] = [];
      for await (const chunk of res.Body as Readable) chunks.push(Buffer.from(chunk as Uint8Array));
      return Buffer.concat(chunks);
    });
  }

  /**
   * The object as a stream with its length (and type and metadata, from the same answer), for
   * answers and copies that must not hold it in memory.
   * @throws ObjectMissingError when there is no such object; ObjectStoreUnavailableError when the store is down
   */
  async getStream(key: string): Promise<{ body: Readable; size: number; contentType: string | undefined; metadata: Record<string, string> }> {
    return this.wrap(async () => {
      const res = await this.client.send(new GetObjectCommand({ Bucket: this.config.bucket, Key: key })).catch((error: unknown) => {
        if (error instanceof S3ServiceException && (error.name === 'NoSuchKey' || error.$metadata.httpStatusCode === 404)) throw new ObjectMissingError(`no object ${key}`);
        throw error;
      });
      return { body: res.Body as Readable, size: res.ContentLength ?? 0, contentType: res.ContentType, metadata: res.Metadata ?? {} };
    });
  }

  /**
   * Size, type and metadata of one object without its bytes.
   * @throws ObjectMissingError when there is no such object; ObjectStoreUnavailableError when the store is down
   */
  async head(key: string): Promise<ObjectHead> {
    return this.wrap(async () => {
      const res = await this.client.send(new HeadObjectCommand({ Bucket: this.config.bucket, Key: key })).catch((error: unknown) => {
        if (error instanceof S3ServiceException && error.$metadata.httpStatusCode === 404) throw new ObjectMissingError(`no object ${key}`);
        throw error;
      });
      return { size: res.ContentLength ?? 0, contentType: res.ContentType, metadata: res.Metadata ?? {}, etag: res.ETag, lastModified: res.LastModified };
    });
  }

  /**
   * Every object under a prefix in key order, one object at a time over `listPages` (memory stays one page).
   * @throws ObjectStoreUnavailableError when the store is down at any page
   */
  async *listAll(prefix = ''): AsyncGenerator<ListedObject> {
    for await (const page of this.listPages(prefix, this.config.listPageSize)) {
      for (const o of page) yield { key: o.key, size: o.sizeBytes, lastModified: o.lastModified };
    }
  }

  /** Keys under a prefix (first 1000; for tests and maintenance). */
  async list(prefix = ''): Promise<string[]> {
    return this.wrap(async () => {
      const res = await this.client.send(new ListObjectsV2Command({ Bucket: this.config.bucket, Prefix: prefix }));
      return (res.Contents ?? []).map((o) => o.Key ?? '').filter(Boolean);
    });
  }

  /**
   * Every object under a prefix, a page at a time (at most `pageSize`, ≤ 1000), following the
   * store's continuation tokens, so a bucket of any size is walked without holding it all. An
   * object listed without a time reads as written now (never "old enough" to clean up).
   * @throws ObjectStoreUnavailableError when the store is down
   */
  async *listPages(prefix = '', pageSize = 1000): AsyncGenerator<StoredObject[]> {
    let token: string | undefined;
    do {
      const res = await this.wrap(() => this.client.send(new ListObjectsV2Command({ Bucket: this.config.bucket, Prefix: prefix, ContinuationToken: token, MaxKeys: pageSize })));
      yield (res.Contents ?? []).flatMap((o) => (o.Key ? [{ key: o.Key, lastModified: o.LastModified ?? new Date(), sizeBytes: o.Size ?? 0 }] : []));
      token = res.IsTruncated ? res.NextContinuationToken : undefined;
    } while (token);
  }

  async delete(key: string): Promise<void> {
    await this.wrap(() => this.client.send(new DeleteObjectCommand({ Bucket: this.config.bucket, Key: key })));
  }

  destroy(): void {
    this.client.destroy();
  }

  private async wrap<T>(fn: () => Promise<T>): Promise<T> {
    try {
      return await fn();
    } catch (error) {
      if (error instanceof ObjectMissingError) throw error;
      // Service errors with a 4xx are ours to see; network failures and 5xx mean "try later".
      if (error instanceof S3ServiceException && (error.$metadata.httpStatusCode ?? 500) < 500) throw error;
      throw new ObjectStoreUnavailableError(`object store unavailable: ${error instanceof Error ? error.message : String(error)}`);
    }
  }
}
