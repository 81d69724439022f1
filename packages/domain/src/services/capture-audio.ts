import { type Capture } from '@earmark/db';
import { ObjectMissingError, ObjectStoreUnavailableError, type ObjectStore } from '@earmark/platform';
import { decodeCapture, type DecodedAudio } from '@earmark/dsp';
import { NotFoundError, ServiceUnavailableError } from '../errors.js';

/** Reads a stored capture from the object store and decodes it the way the upload validated it. */
export class CaptureAudioLoader {
  constructor(private readonly objectStore: ObjectStore) {}

  /** @throws NotFoundError when the bytes are gone; ServiceUnavailableError (503) when the store is down */
  async load(capture: Pick<Capture, 'id' | 'objectKey' | 'format' | 'sampleRate' | 'channelCount'>): Promise<DecodedAudio> {
    const bytes = await this.objectStore.get(capture.objectKey).catch((error: unknown) => {
      if (error instanceof ObjectMissingError) throw new NotFoundError(`The stored bytes of capture ${capture.id} are missing.`);
      if (error instanceof ObjectStoreUnavailableError) throw new ServiceUnavailableError('Capture storage is unavailable right now; try again shortly.');
      throw error;
    });
    const container = capture.format.container === 'raw-f32le' ? 'raw-f32le' : 'wav';
    return decodeCapture(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), { container, sampleRate: capture.sampleRate, channels: capture.channelCount });
  }
}
