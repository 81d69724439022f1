import { AudioDecodeError } from './audio-decode-error.js';
import { MAX_RIFF_CHUNKS } from './audio-limits.js';

/** One chunk of a RIFF file: its four-character id, where its body starts, and its declared size. */
export interface RiffChunk {
  id: string;
  /** Byte offset of the chunk body (after the 8-byte id + size header). */
  offset: number;
  /** Size declared in the chunk header, in bytes (without the pad byte). */
  size: number;
}

function fourcc(bytes: Uint8Array, at: number): string {
  return String.fromCharCode(bytes[at] ?? 0, bytes[at + 1] ?? 0, bytes[at + 2] ?? 0, bytes[at + 3] ?? 0);
}

/**
 * Lists the chunks of a RIFF/WAVE file in file order. Chunks may come in any order; a chunk
 * of odd size is followed by one pad byte (Microsoft/IBM, "Multimedia Programming Interface
 * and Data Specifications 1.0", 1991, RIFF chunk layout). The RIFF size field is not trusted
 * (many writers get it wrong): chunks are walked to the end of the bytes. A chunk that runs
 * past the end is returned with its declared size; the caller decides whether that is fatal.
 * At most `maxChunks` chunks are walked, so hostile files cost O(maxChunks) time and memory.
 *
 * @throws AudioDecodeError `not-riff` when the bytes do not start with `RIFF….WAVE`;
 *   `too-many-chunks` when the file holds more than `maxChunks` chunks.
 */
export function readRiffChunks(bytes: Uint8Array, maxChunks: number = MAX_RIFF_CHUNKS): RiffChunk[] {
  if (bytes.length < 12 || fourcc(bytes, 0) !== 'RIFF' || fourcc(bytes, 8) !== 'WAVE') {
    const head = bytes.length >= 4 ? fourcc(bytes, 0) : '';
    const hint =
      head === 'RF64' || head === 'BW64'
        ? ' It is an RF64/BW64 file, which Earmark does not read; export it as a plain WAV (under 4 GB).'
        : head === 'RIFX'
          ? ' It is a big-endian RIFX file; export it as a little-endian WAV.'
          : '';
    throw new AudioDecodeError(
      'not-riff',
      `The file is not a WAV file (a WAV file has the bytes "RIFF" at offset 0 and "WAVE" at offset 8).${hint}`,
    );
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const chunks: RiffChunk[] = [];
  let at = 12;
  while (at + 8 <= bytes.length) {
    if (chunks.length === maxChunks) {
      throw new AudioDecodeError(
        'too-many-chunks',
        `The WAV file holds more than ${maxChunks} chunks (the next one starts at byte ${at}); Earmark reads WAV files of at most ${maxChunks} chunks. Re-export the capture without padding or metadata chunks.`,
      );
    }
    const id = fourcc(bytes, at);
    const size = view.getUint32(at + 4, true);
    chunks.push({ id, offset: at + 8, size });
    at += 8 + size + (size % 2);
  }
  return chunks;
}
