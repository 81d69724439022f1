import { createHash } from 'node:crypto';
import { StimulusSpec } from '@earmark/contracts';
import { stimulusAsPlayed } from '@earmark/dsp';
import { canonicalJson } from '../util/canonical-json.js';

/** A stimulus as rigs play it: what a capture is judged against. */
export type PlayedStimulus = ReturnType<typeof stimulusAsPlayed>;

/**
 * Samples one analysis thread keeps cached: 2^24 (one stimulus at MAX_STIMULUS_SAMPLES, or many
 * small ones), i.e. 128 MiB of Float64 per thread. Counted in EARMARK_ANALYSIS_MEMORY_MB.
 */
export const STIMULUS_CACHE_SAMPLES = 2 ** 24;

/** A stable key for a spec: SHA-256 of its canonical JSON with the schema's defaults filled in. */
export const stimulusSpecHash = (spec: StimulusSpec): string => createHash('sha256').update(canonicalJson(StimulusSpec.parse(spec))).digest('hex');

const samplesOf = (stimulus: PlayedStimulus) => stimulus.channels.reduce((n, c) => n + c.length, 0);

/**
 * The played stimuli of recent specs, least recently used evicted first once the samples held
 * pass the bound. Every capture of a test case is judged against the same stimulus, and
 * rebuilding it (generate, then round to float32) cost about a tenth of the worker's CPU.
 * Callers must not write into the arrays it returns: they are shared by later judgements.
 */
export class StimulusCache {
  private readonly entries = new Map<string, { stimulus: PlayedStimulus; samples: number }>();
  private held = 0;
  /** Stimuli generated (misses) and served from the cache (hits), for logs and tests. */
  readonly counts = { builds: 0, hits: 0 };

  constructor(
    private readonly maxSamples = STIMULUS_CACHE_SAMPLES,
    private readonly build: (spec: StimulusSpec) => PlayedStimulus = stimulusAsPlayed,
  ) {}

  /** The played stimulus of `spec` and whether it came from the cache. @throws StimulusError for an invalid spec */
  get(spec: StimulusSpec): { stimulus: PlayedStimulus; cached: boolean } {
    const key = stimulusSpecHash(spec);
    const hit = this.entries.get(key);
    if (hit) {
      // Map keeps insertion order: re-inserting marks the entry most recently used.
      this.entries.delete(key);
      this.entries.set(key, hit);
      this.counts.hits++;
      return { stimulus: hit.stimulus, cached: true };
    }
    const stimulus = this.build(spec);
    this.counts.builds++;
    const samples = samplesOf(stimulus);
    if (samples <= this.maxSamples) {
      this.entries.set(key, { stimulus, samples });
      this.held += samples;
      for (const [oldest, entry] of this.entries) {
        if (this.held <= this.maxSamples) break;
        this.entries.delete(oldest);
        this.held -= entry.samples;
      }
    }
    return { stimulus, cached: false };
  }

  /** Samples held now (at most the bound). */
  get samples(): number {
    return this.held;
  }
}
