import { createHash } from 'node:crypto';
import { Readable } from 'node:stream';
import { StimulusSpec } from '@earmark/contracts';
import { ENGINE_VERSION } from '@earmark/dsp';
import { ObjectMissingError, ObjectStoreUnavailableError, type ObjectStore } from '@earmark/platform';
import type { ViewsCompute } from '../compute/views-tasks.js';
import { ServiceUnavailableError } from '../errors.js';
import { canonicalJson } from '../util/canonical-json.js';
import { SingleFlight } from '../util/single-flight.js';

/** A stored WAV ready to send: a stream and its length. */
export interface WavStream {
  body: Readable;
  size: number;
}

/** Where the WAV of a spec lives: the engine version and the hash of the spec with its defaults filled in. */
export const stimulusKey = (spec: StimulusSpec): string =>
  `stimuli/${ENGINE_VERSION}/${createHash('sha256').update(canonicalJson(StimulusSpec.parse(spec))).digest('hex')}.wav`;

/**
 * Stimulus WAVs (32-bit float), generated once per spec in a compute thread and stored in the
 * object store; every download after the first streams the stored file.
 */
export class StimulusFiles {
  /** Generations under way in this process, so concurrent first downloads generate once. */
  private readonly generating = new SingleFlight<Uint8Array>();

  constructor(
    private readonly objectStore: ObjectStore,
    private readonly compute: ViewsCompute,
  ) {}

  /** @throws ServiceUnavailableError when the store is down; the pool's errors when it is busy */
  async open(spec: StimulusSpec): Promise<WavStream> {
    const key = stimulusKey(spec);
    const stored = await this.objectStore.getStream(key).catch((error: unknown) => {
      if (error instanceof ObjectMissingError) return null;
      if (error instanceof ObjectStoreUnavailableError) throw new ServiceUnavailableError('Stimulus storage is unavailable right now; try again shortly.');
      throw error;
    });
    if (stored) return stored;
    const wav = await this.generate(key, spec);
    return { body: Readable.from([Buffer.from(wav.buffer, wav.byteOffset, wav.byteLength)]), size: wav.byteLength };
  }

  private generate(key: string, spec: StimulusSpec): Promise<Uint8Array> {
    return this.generating.run(key, async () => {
      const { wav, sha256 } = await this.compute.run('renderStimulusWav', { spec });
      // Stored for every later download; a store that is down only means generating again next time.
      await this.objectStore.put(key, wav, 'audio/wav', {}, { payloadSha256: sha256 }).catch(() => {});
      return wav;
    });
  }
}
