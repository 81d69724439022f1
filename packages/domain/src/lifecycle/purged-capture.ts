import { CAPTURE_PURGED, capturePurgedDetail } from '@earmark/contracts';
import type { Capture } from '@earmark/db';
import { GoneError } from '../errors.js';

/** @throws GoneError (410 capture-purged) when the retention policy removed the capture's audio */
export function assertAudioStored(capture: Pick<Capture, 'purgedAt'>): void {
  if (capture.purgedAt) throw new GoneError(capturePurgedDetail(capture.purgedAt), CAPTURE_PURGED);
}
