/**
 * Listening levels. Test signals and residuals can be loud, so playback starts low and the
 * level can never be turned above a hard cap: the gain is clamped to the cap, and a capture
 * whose samples go past full scale is scaled down so its peak still lands at or below it.
 */
export const PLAYBACK_LEVEL = {
  /** Bottom of the slider. */
  minDb: -60,
  /** The cap: nothing plays louder than this, relative to full scale. */
  maxDb: -6,
  /** Where playback starts in every new session. */
  initialDb: -30,
  stepDb: 1,
} as const;

export function dbToGain(db: number): number {
  return 10 ** (db / 20);
}

export function gainToDb(gain: number): number {
  return 20 * Math.log10(gain);
}

/** The level the slider may be at: inside [minDb, maxDb], the initial level when not a number. */
export function clampPlaybackLevelDb(db: number): number {
  if (!Number.isFinite(db)) return PLAYBACK_LEVEL.initialDb;
  return Math.min(PLAYBACK_LEVEL.maxDb, Math.max(PLAYBACK_LEVEL.minDb, db));
}

/** Largest absolute sample over all channels (1 = full scale). */
export function peakOf(channels: readonly ArrayLike<number>[]): number {
  let peak = 0;
  for (const data of channels) {
    for (let i = 0; i < data.length; i++) {
      const v = Math.abs(data[i] as number);
      if (v > peak) peak = v;
    }
  }
  return peak;
}

/**
 * Linear gain for the playback chain. With peak = the buffer's largest |sample|, the output
 * peak is gain × peak ≤ 10^(level/20) ≤ 10^(cap/20): a float capture above full scale is
 * brought down rather than played hot.
 */
export function playbackGain(levelDb: number, peak: number): number {
  const level = dbToGain(clampPlaybackLevelDb(levelDb));
  return peak > 1 && Number.isFinite(peak) ? level / peak : level;
}
