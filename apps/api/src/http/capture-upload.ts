import { RAW_FLOAT32_MEDIA_TYPE, TargetKey, TestCaseKey, WAV_MEDIA_TYPES } from '@earmark/contracts';
import { parseWith, type CaptureUpload } from '@earmark/domain';
import type { Request } from 'express';
import { z } from 'zod';
import { UnsupportedMediaTypeError } from '../errors.js';
import { readMultipart, readRawBody } from './read-upload.js';

const Destination = z.object({ testCase: TestCaseKey, target: TargetKey.optional() });
const RawFormat = z.object({
  'x-sample-rate': z.coerce.number().int().min(8000).max(192000),
  'x-channels': z.coerce.number().int().min(1).max(8),
});
const IdempotencyKey = z.string().min(1).max(200).regex(/^[\x21-\x7e]+$/, 'printable ASCII without spaces');

const mediaTypeOf = (header: string | undefined) => (header ?? '').split(';')[0]!.trim().toLowerCase();

/**
 * Reads a capture upload off the request: a WAV body, a raw float32 body (rate and channels in
 * X-Sample-Rate and X-Channels) or multipart/form-data with a `file` part. A raw upload names its
 * test case and target in the query; `checkDestination` runs before its body is read, so an
 * unknown test case costs no upload.
 */
export async function readCaptureUpload(
  req: Request,
  maxBytes: number,
  checkDestination: (destination: z.infer<typeof Destination>) => Promise<unknown>,
): Promise<CaptureUpload> {
  const mediaType = mediaTypeOf(req.headers['content-type']);
  const isMultipart = mediaType === 'multipart/form-data';
  const isWav = (WAV_MEDIA_TYPES as readonly string[]).includes(mediaType);
  if (!isMultipart && !isWav && mediaType !== RAW_FLOAT32_MEDIA_TYPE) {
    req.resume();
    throw new UnsupportedMediaTypeError(
      `Send a capture as audio/wav, as ${RAW_FLOAT32_MEDIA_TYPE} (with X-Sample-Rate and X-Channels), or as multipart/form-data with a \`file\` part; got ${mediaType || 'no Content-Type'}.`,
    );
  }
  const idempotencyKey = req.headers['idempotency-key'] === undefined ? null : parseWith(IdempotencyKey, req.headers['idempotency-key'], 'params');

  if (isMultipart) {
    const upload = await readMultipart(req, maxBytes);
    const destination = parseWith(Destination, upload.fields, 'body');
    const raw = upload.mediaType === RAW_FLOAT32_MEDIA_TYPE;
    return {
      bytes: upload.bytes,
      encoding: raw ? rawEncoding({ ...upload.fields, ...req.headers }) : { kind: 'wav' },
      ...destination,
      fileName: upload.fileName,
      idempotencyKey,
    };
  }
  const destination = parseWith(Destination, req.query, 'query');
  await checkDestination(destination);
  const encoding = isWav ? ({ kind: 'wav' } as const) : rawEncoding(req.headers);
  return { bytes: await readRawBody(req, maxBytes), encoding, ...destination, fileName: null, idempotencyKey };
}

function rawEncoding(source: Record<string, unknown>): CaptureUpload['encoding'] {
  const format = parseWith(RawFormat, source, 'params');
  return { kind: 'raw-float32', sampleRate: format['x-sample-rate'], channels: format['x-channels'] };
}
