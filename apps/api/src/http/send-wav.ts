import { pipeline } from 'node:stream/promises';
import type { Response } from 'express';
import type { WavStream } from '@earmark/domain';

/**
 * Streams a WAV to the client with its length, never holding it whole in this process. A client
 * that goes away ends the read from the store too.
 */
export async function sendWav(res: Response, wav: WavStream, headers: Record<string, string>): Promise<void> {
  res.status(200).type('audio/wav').setHeader('Content-Length', String(wav.size));
  for (const [name, value] of Object.entries(headers)) res.setHeader(name, value);
  await pipeline(wav.body, res).catch((error: unknown) => {
    // Headers are gone; all that is left is to stop (the error handler logs errors after headers).
    if (!res.writableEnded) res.destroy(error instanceof Error ? error : undefined);
  });
}
