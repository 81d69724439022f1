// Builds RIFF/WAVE bytes chunk by chunk so error tests can damage exactly one thing.

export function chunk(id: string, body: Uint8Array, declaredSize = body.length): Uint8Array {
  const pad = body.length % 2;
  const out = new Uint8Array(8 + body.length + pad);
  for (let i = 0; i < 4; i++) out[i] = id.charCodeAt(i);
  new DataView(out.buffer).setUint32(4, declaredSize, true);
  out.set(body, 8);
  return out;
}

export function riff(chunks: Uint8Array[], head = 'RIFF', form = 'WAVE'): Uint8Array {
  const bodyLength = 4 + chunks.reduce((n, c) => n + c.length, 0);
  const out = new Uint8Array(8 + bodyLength);
  const view = new DataView(out.buffer);
  for (let i = 0; i < 4; i++) out[i] = head.charCodeAt(i);
  view.setUint32(4, bodyLength, true);
  for (let i = 0; i < 4; i++) out[8 + i] = form.charCodeAt(i);
  let at = 12;
  for (const c of chunks) {
    out.set(c, at);
    at += c.length;
  }
  return out;
}

export interface FmtFields {
  tag?: number;
  channels?: number;
  rate?: number;
  blockAlign?: number;
  bits?: number;
}

/** A 16-byte plain fmt body; blockAlign defaults to the consistent value. */
export function fmtBody(f: FmtFields = {}): Uint8Array {
  const channels = f.channels ?? 1;
  const bits = f.bits ?? 16;
  const rate = f.rate ?? 48000;
  const blockAlign = f.blockAlign ?? (channels * bits) / 8;
  const out = new Uint8Array(16);
  const v = new DataView(out.buffer);
  v.setUint16(0, f.tag ?? 1, true);
  v.setUint16(2, channels, true);
  v.setUint32(4, rate, true);
  v.setUint32(8, rate * blockAlign, true);
  v.setUint16(12, blockAlign, true);
  v.setUint16(14, bits, true);
  return out;
}

/** A 40-byte WAVE_FORMAT_EXTENSIBLE fmt body; `guidTail` lets a test damage the GUID. */
export function extensibleFmtBody(
  f: FmtFields & { subFormat?: number; validBits?: number; mask?: number; guidTail?: number[] } = {},
): Uint8Array {
  const plain = fmtBody({ ...f, tag: 0xfffe });
  const out = new Uint8Array(40);
  out.set(plain);
  const v = new DataView(out.buffer);
  v.setUint16(16, 22, true);
  v.setUint16(18, f.validBits ?? f.bits ?? 16, true);
  v.setUint32(20, f.mask ?? 0, true);
  v.setUint32(24, f.subFormat ?? 1, true);
  const tail = f.guidTail ?? [0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71];
  tail.forEach((b, i) => v.setUint8(28 + i, b));
  return out;
}

export function int16Body(values: number[]): Uint8Array {
  const out = new Uint8Array(values.length * 2);
  const v = new DataView(out.buffer);
  values.forEach((x, i) => v.setInt16(i * 2, x, true));
  return out;
}

export function float32Body(values: number[]): Uint8Array {
  const out = new Uint8Array(values.length * 4);
  const v = new DataView(out.buffer);
  values.forEach((x, i) => v.setFloat32(i * 4, x, true));
  return out;
}
