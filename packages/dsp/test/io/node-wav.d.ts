// node-wav 0.0.2 ships no types; only decode() is used, as a cross-check in tests.
declare module 'node-wav' {
  const nodeWav: { decode(buffer: Uint8Array): { sampleRate: number; channelData: Float32Array[] } };
  export default nodeWav;
}
