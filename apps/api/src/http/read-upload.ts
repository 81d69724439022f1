import busboy from 'busboy';
import type { Request } from 'express';
import { PayloadTooLargeError, ValidationError } from '../errors.js';

export interface Upload {
  bytes: Buffer;
  /** Form fields of a multipart upload; empty for a raw body. */
  fields: Record<string, string>;
  /** The media type of the audio itself (the file part's, for multipart). */
  mediaType: string;
  fileName: string | null;
}

/**
 * Reads a raw request body up to `limit` bytes.
 * NOTE: captures are validated completely (header and every sample) before anything is
 * stored, so the body is held in memory; the limit bounds that memory per request.
 * @throws PayloadTooLargeError as soon as the body passes the limit.
 */
export async function readRawBody(req: Request, limit: number): Promise<Buffer> {
  const declared = Number(req.headers['content-length'] ?? NaN);
  if (Number.isFinite(declared) && declared > limit) {
    req.resume();
    throw new PayloadTooLargeError(limit);
  }
  const chunks: Buffer[] = [];
  let total = 0;
  for await (const chunk of req) {
    const buf = chunk as Buffer;
    total += buf.length;
    if (total > limit) {
      req.resume();
      throw new PayloadTooLargeError(limit);
    }
    chunks.push(buf);
  }
  return Buffer.concat(chunks, total);
}

/** Reads a multipart/form-data body with one file part (`file`) and text fields. */
export function readMultipart(req: Request, limit: number): Promise<Upload> {
  return new Promise((resolve, reject) => {
    let parser: busboy.Busboy;
    try {
      parser = busboy({ headers: req.headers, limits: { files: 1, fileSize: limit, fields: 20, fieldSize: 1024 } });
    } catch (error) {
      reject(new ValidationError(`The multipart body cannot be read: ${error instanceof Error ? error.message : String(error)}`));
      return;
    }
    const fields: Record<string, string> = {};
    let file: Omit<Upload, 'fields'> | null = null;
    let failed: Error | null = null;
    const pending: Promise<void>[] = [];
    parser.on('field', (name, value) => {
      fields[name] = value;
    });
    parser.on('file', (name, stream, info) => {
      if (name !== 'file') {
        stream.resume();
        return;
      }
      pending.push(
        (async () => {
          const chunks: Buffer[] = [];
          stream.on('limit', () => {
            failed ??= new PayloadTooLargeError(limit);
          });
          for await (const chunk of stream) chunks.push(chunk as Buffer);
          file = { bytes: Buffer.concat(chunks), mediaType: info.mimeType, fileName: info.filename ?? null };
        })(),
      );
    });
    parser.on('error', (error: Error) => reject(new ValidationError(`The multipart body cannot be read: ${error.message}`)));
    parser.on('close', () => {
      void Promise.all(pending).then(() => {
        if (failed) return reject(failed);
        if (!file) return reject(new ValidationError('The multipart body has no `file` part.', [{ path: 'body.file', message: 'required' }]));
        resolve({ ...(file as Omit<Upload, 'fields'>), fields });
      }, reject);
    });
    req.pipe(parser);
  });
}
