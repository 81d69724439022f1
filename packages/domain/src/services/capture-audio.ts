import { type Capture } from '@earmark/db';
import { ObjectMissingError, ObjectStoreUnavailableError, type ObjectStore } from '@earmark/platform';
import { AudioDecodeError, decodeCapture, type DecodedAudio } from '@earmark/dsp';
import { storedFormatOf } from '../judging/judge-capture.js';
import { NotFoundError, ServiceUnavailableError, UnsupportedCaptureError } from '../errors.js';
import { assertAudioStored } from '../lifecycle/purged-capture.js';

/** Reads a stored capture from the object store and decodes it the way the upload validated it. */
export class CaptureAudioLoader {
  constructor(private readonly objectStore: ObjectStore) {}

  /**
   * @throws NotFoundError when the bytes are gone; ServiceUnavailableError (503) when the store is down;
   *   UnsupportedCaptureError (422) when the stored bytes break a decoder bound added after they were
   *   accepted (e.g. too many samples), so a plot refuses instead of exhausting memory
   */
  async load(capture: Pick<Capture, 'id' | 'objectKey' | 'format' | 'sampleRate' | 'channelCount' | 'purgedAt'>): Promise<DecodedAudio> {
    const bytes = await this.bytes(capture);
    try {
      return decodeCapture(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), storedFormatOf(capture));
    } catch (error) {
      if (error instanceof AudioDecodeError) throw new UnsupportedCaptureError(`Capture ${capture.id} cannot be analysed: ${error.message}`, error.code);
      throw error;
    }
  }

  /**
   * The stored bytes, undecoded (for a compute thread to decode).
   * @throws GoneError (410) when the retention policy removed them; NotFoundError; ServiceUnavailableError (503)
   */
  async bytes(capture: Pick<Capture, 'id' | 'objectKey' | 'purgedAt'>): Promise<Buffer> {
    assertAudioStored(capture);
    return this.objectStore.get(capture.objectKey).catch((error: unknown) => {
      if (error instanceof ObjectMissingError) throw new NotFoundError(`The stored bytes of capture ${capture.id} are missing.`);
      if (error instanceof ObjectStoreUnavailableError) throw new ServiceUnavailableError('Capture storage is unavailable right now; try again shortly.');
      throw error;
    });
  }
}
