/** WAV headers written by hand: the hostile shapes the encoder would never produce. */
function ascii(v: DataView, at: number, s: string): void {
  for (let i = 0; i < s.length; i++) v.setUint8(at + i, s.charCodeAt(i));
}

/**
 * A RIFF/WAVE file of exactly `totalBytes`: a PCM fmt chunk, `junkChunks` empty JUNK chunks,
 * then a data chunk filling the rest (its bytes a 1 kHz square at −6 dBFS, so the file is a
 * real capture when no chunk count or size bound stops it).
 */
export function hostileWav(opts: { totalBytes: number; bits: 8 | 16; channels?: number; sampleRate?: number; junkChunks?: number }): Buffer<ArrayBuffer> {
  const { totalBytes, bits, channels = 1, sampleRate = 48000, junkChunks = 0 } = opts;
  const bytes = Buffer.alloc(totalBytes);
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  ascii(v, 0, 'RIFF');
  v.setUint32(4, totalBytes - 8, true);
  ascii(v, 8, 'WAVE');
  ascii(v, 12, 'fmt ');
  v.setUint32(16, 16, true);
  v.setUint16(20, 1, true);
  v.setUint16(22, channels, true);
  v.setUint32(24, sampleRate, true);
  v.setUint32(28, (sampleRate * channels * bits) / 8, true);
  v.setUint16(32, (channels * bits) / 8, true);
  v.setUint16(34, bits, true);
  let at = 36;
  const maxJunk = Math.floor((totalBytes - at - 8) / 8);
  for (let i = 0; i < Math.min(junkChunks, maxJunk); i++, at += 8) ascii(v, at, 'JUNK');
  const frameBytes = (channels * bits) / 8;
  const dataBytes = Math.floor((totalBytes - at - 8) / frameBytes) * frameBytes;
  ascii(v, at, 'data');
  v.setUint32(at + 4, dataBytes, true);
  const start = at + 8;
  if (bits === 8) {
    // Unsigned 8-bit: 128 is zero.
    for (let i = 0; i < dataBytes; i++) bytes[start + i] = Math.floor(i / channels / 24) % 2 ? 192 : 64;
  } else {
    for (let i = 0; i < dataBytes / 2; i++) v.setInt16(start + 2 * i, Math.floor(i / channels / 24) % 2 ? 16384 : -16384, true);
  }
  return bytes;
}
