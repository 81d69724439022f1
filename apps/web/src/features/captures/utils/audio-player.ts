import { PLAYBACK_LEVEL, playbackGain, peakOf } from './playback-level';

/**
 * One Web Audio chain for the listen panel:
 * source → gain (clamped to the cap) → limiter at the cap → speakers.
 * The gain alone already keeps the sample peak at or below the cap (see playbackGain); the
 * limiter is a second line of defence against inter-sample overs.
 */
export type AudioPlayer = {
  decode(bytes: ArrayBuffer): Promise<AudioBuffer>;
  play(buffer: AudioBuffer, levelDb: number, onEnded: () => void): void;
  setLevel(levelDb: number): void;
  stop(): void;
  close(): void;
};

type AudioContextConstructor = new () => AudioContext;

export function audioContextConstructor(): AudioContextConstructor | null {
  if (typeof window === 'undefined') return null;
  const scope = window as unknown as { AudioContext?: AudioContextConstructor; webkitAudioContext?: AudioContextConstructor };
  return scope.AudioContext ?? scope.webkitAudioContext ?? null;
}

export function createAudioPlayer(Context: AudioContextConstructor): AudioPlayer {
  let context: AudioContext | null = null;
  let source: AudioBufferSourceNode | null = null;
  let gain: GainNode | null = null;
  let peak = 1;
  const peaks = new WeakMap<AudioBuffer, number>();

  const ensureContext = (): AudioContext => {
    context ??= new Context();
    return context;
  };

  const stop = () => {
    if (source) {
      source.onended = null;
      try {
        source.stop();
      } catch {
        // Already stopped.
      }
      source.disconnect();
      source = null;
    }
    gain?.disconnect();
    gain = null;
  };

  return {
    async decode(bytes) {
      // decodeAudioData detaches the buffer it is given; keep the cached bytes intact.
      const buffer = await ensureContext().decodeAudioData(bytes.slice(0));
      const channels: Float32Array[] = [];
      for (let c = 0; c < buffer.numberOfChannels; c++) channels.push(buffer.getChannelData(c));
      peaks.set(buffer, peakOf(channels));
      return buffer;
    },
    play(buffer, levelDb, onEnded) {
      stop();
      const ctx = ensureContext();
      void ctx.resume();
      peak = peaks.get(buffer) ?? 1;
      const limiter = ctx.createDynamicsCompressor();
      limiter.threshold.value = PLAYBACK_LEVEL.maxDb;
      limiter.knee.value = 0;
      limiter.ratio.value = 20;
      limiter.attack.value = 0.001;
      limiter.release.value = 0.05;
      gain = ctx.createGain();
      gain.gain.value = playbackGain(levelDb, peak);
      source = ctx.createBufferSource();
      source.buffer = buffer;
      source.connect(gain).connect(limiter).connect(ctx.destination);
      source.onended = () => {
        stop();
        onEnded();
      };
      source.start();
    },
    setLevel(levelDb) {
      if (!gain || !context) return;
      // A short ramp avoids a click when the slider moves during playback.
      gain.gain.setTargetAtTime(playbackGain(levelDb, peak), context.currentTime, 0.02);
    },
    stop,
    close() {
      stop();
      void context?.close();
      context = null;
    },
  };
}
