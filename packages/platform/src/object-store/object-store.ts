import type { Readable } from 'node:stream';
import {
  CreateBucketCommand,
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';

export interface ObjectStoreConfig {
  endpoint: string;
  bucket: string;
  region?: string;
  accessKeyId: string;
  secretAccessKey: string;
}

// NOTE: the SDK warns on Node 20 at every start; the pinned release supports it.
process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= 'true';

/** The object store could not be reached or refused the request; retry later. */
export class ObjectStoreUnavailableError extends Error {}

/** The object does not exist (deleted, or never stored). */
export class ObjectMissingError extends Error {}

/** Capture bytes in S3-compatible storage; keys are chosen by the caller. */
export class ObjectStore {
  private readonly client: S3Client;

  constructor(readonly config: ObjectStoreConfig) {
    this.client = new S3Client({
      region: config.region ?? 'us-east-1',
      endpoint: config.endpoint,
      forcePathStyle: true,
      credentials: { accessKeyId: config.accessKeyId, secretAccessKey: config.secretAccessKey },
      // NOTE: without these two a streamed upload is stored with aws-chunked framing inside.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
      maxAttempts: 2,
    });
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
    const command = new PutObjectCommand({ Bucket: this.config.bucket, Key: key, Body: body, ContentType: contentType, ContentLength: body.byteLength, Metadata: metadata });
    const { payloadSha256 } = options;
    if (payloadSha256) {
      command.middlewareStack.add(
        (next) => (args) => {
          (args.request as { headers: Record<string, string> }).headers['x-amz-content-sha256'] = payloadSha256;
          return next(args);
        },
        { step: 'build', name: 'earmarkKnownPayloadHash' },
      );
    }
    await this.wrap(() => this.client.send(command));
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
   * The object as a stream with its length, for answers that must not hold it in memory.
   * @throws ObjectMissingError when there is no such object; ObjectStoreUnavailableError when the store is down
   */
  async getStream(key: string): Promise<{ body: Readable; size: number }> {
    return this.wrap(async () => {
      const res = await this.client.send(new GetObjectCommand({ Bucket: this.config.bucket, Key: key })).catch((error: unknown) => {
        if (error instanceof S3ServiceException && (error.name === 'NoSuchKey' || error.$metadata.httpStatusCode === 404)) throw new ObjectMissingError(`no object ${key}`);
        throw error;
      });
      return { body: res.Body as Readable, size: res.ContentLength ?? 0 };
    });
  }

  /** Keys under a prefix (first 1000; for tests and maintenance). */
  async list(prefix = ''): Promise<string[]> {
    return this.wrap(async () => {
      const res = await this.client.send(new ListObjectsV2Command({ Bucket: this.config.bucket, Prefix: prefix }));
      return (res.Contents ?? []).map((o) => o.Key ?? '').filter(Boolean);
    });
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
