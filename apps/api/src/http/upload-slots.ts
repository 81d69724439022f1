import { HttpError } from '../errors.js';

/** Seconds an upload refused for lack of a slot should wait before trying again. */
export const UPLOAD_RETRY_AFTER_S = 2;

/** Every upload slot of this process is taken. */
export class UploadsBusyError extends HttpError {
  constructor(limit: number) {
    super(503, 'Busy', `This server is already receiving ${limit} captures; retry shortly.`, {
      // The body is not read: close the connection rather than leave it half-sent on a kept-alive socket.
      headers: { 'Retry-After': String(UPLOAD_RETRY_AFTER_S), Connection: 'close' },
    });
  }
}

/**
 * Bounds the capture uploads one process holds at once (each may hold a whole capture in
 * memory while it is read and decoded): beyond the limit an upload is refused before its body is read.
 */
export class UploadSlots {
  private taken = 0;

  constructor(readonly limit: number) {}

  /** A slot, released by calling the answer once; @throws UploadsBusyError when none is free */
  take(): () => void {
    if (this.taken >= this.limit) throw new UploadsBusyError(this.limit);
    this.taken++;
    let released = false;
    return () => {
      if (released) return;
      released = true;
      this.taken--;
    };
  }

  get inUse(): number {
    return this.taken;
  }
}
