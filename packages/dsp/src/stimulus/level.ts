/**
 * dBFS with the AES17 convention: a full-scale sine is 0 dBFS, so RMS in dBFS is
 * 20·log10(rms·√2) (AES17, Audio Engineering Society standard on measuring digital audio
 * equipment; Earmark's declared convention, docs/stimuli.md).
 */

/** Peak amplitude of a sine at `levelDbfs`: 10^(L/20). */
export function sineAmplitudeFromDbfs(levelDbfs: number): number {
  return 10 ** (levelDbfs / 20);
}

/** RMS of any signal at `levelDbfs`: 10^(L/20)/√2. */
export function rmsFromDbfs(levelDbfs: number): number {
  return 10 ** (levelDbfs / 20) / Math.SQRT2;
}

/** Level in dBFS of a signal with this RMS: 20·log10(rms·√2); −Infinity for silence. */
export function dbfsFromRms(rms: number): number {
  return 20 * Math.log10(rms * Math.SQRT2);
}
