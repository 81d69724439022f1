import { createHash } from 'node:crypto';

export interface CaptureIdentity {
  project: string;
  sha: string;
  testCase: string;
  target: string | undefined;
  /** Hex SHA-256 of the capture bytes. */
  fileSha256: string;
  /** How the bytes are read (`audio/wav`, or raw float32 with its rate and channels). */
  format: string;
}

/**
 * The Idempotency-Key of an upload: the same capture of the same build always gets the same
 * key, so a CI step that is run again (or a retry after a lost answer) gets the capture that
 * already exists instead of a second one. The format is included because the same raw bytes
 * read at another rate or channel count are a different capture.
 */
export function idempotencyKey(identity: CaptureIdentity): string {
  const parts = ['earmark-capture-v1', identity.project, identity.sha, identity.testCase, identity.target ?? '', identity.format, identity.fileSha256];
  // JSON keeps the fields apart: no value can shift bytes into its neighbour.
  return `emk1-${createHash('sha256').update(JSON.stringify(parts)).digest('hex')}`;
}
