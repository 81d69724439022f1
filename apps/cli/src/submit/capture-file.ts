import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { stat } from 'node:fs/promises';
import { basename, extname } from 'node:path';
import { RAW_FLOAT32_MEDIA_TYPE } from '@earmark/contracts';

export type CaptureFormat = 'wav' | 'raw-f32';

/** A capture file checked before any request: readable, not empty, format known, hashed. */
export interface CaptureFile {
  path: string;
  name: string;
  format: CaptureFormat;
  sizeBytes: number;
  /** Hex SHA-256 of the bytes; part of the Idempotency-Key and what the server stores. */
  sha256: string;
}

const FORMAT_BY_EXTENSION: Record<string, CaptureFormat> = { '.wav': 'wav', '.wave': 'wav', '.f32': 'raw-f32', '.raw': 'raw-f32' };

export const MEDIA_TYPE: Record<CaptureFormat, string> = { wav: 'audio/wav', 'raw-f32': RAW_FLOAT32_MEDIA_TYPE };

export function formatOf(path: string): CaptureFormat {
  const format = FORMAT_BY_EXTENSION[extname(path).toLowerCase()];
  if (format === undefined) {
    throw new Error(`cannot tell the format of ${path}: name WAV captures *.wav and raw little-endian float32 captures *.f32 or *.raw`);
  }
  return format;
}

async function sha256Of(path: string): Promise<string> {
  const hash = createHash('sha256');
  // Streamed: captures can be hundreds of megabytes.
  for await (const chunk of createReadStream(path)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

/** Stats and hashes a capture file; every problem is one line naming the file. */
export async function inspectCaptureFile(path: string): Promise<CaptureFile> {
  const format = formatOf(path);
  let sizeBytes: number;
  let sha256: string;
  try {
    const info = await stat(path);
    if (!info.isFile()) throw new Error(`capture ${path} is not a file`);
    sizeBytes = info.size;
    sha256 = await sha256Of(path);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new Error(`capture ${path} does not exist`);
    if (code === 'EACCES' || code === 'EPERM') throw new Error(`capture ${path} is not readable (permission denied)`);
    if (code === 'EISDIR') throw new Error(`capture ${path} is not a file`);
    throw error;
  }
  if (sizeBytes === 0) throw new Error(`capture ${path} is empty`);
  return { path, name: basename(path), format, sizeBytes, sha256 };
}
