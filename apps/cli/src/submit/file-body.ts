import { open, type FileHandle } from 'node:fs/promises';
import { BodySourceError } from '../api-client/api-error.js';

const CHUNK_BYTES = 256 * 1024;

// Marked as a local fault so the client does not retry it as if the network had failed.
const readError = (path: string, error: unknown): BodySourceError =>
  new BodySourceError(`cannot read capture ${path} while uploading it: ${(error as NodeJS.ErrnoException).code ?? (error as Error).message}`);

/**
 * A request body that streams a file and reports how many bytes fetch has taken so far.
 * highWaterMark 0 makes the stream read only when fetch asks for more, so the count
 * follows the socket instead of racing ahead of it.
 */
export function fileBody(path: string, onBytes: (sent: number) => void): ReadableStream<Uint8Array> {
  let handle: FileHandle | undefined;
  let sent = 0;
  const close = async (): Promise<void> => {
    await handle?.close();
    handle = undefined;
  };
  return new ReadableStream<Uint8Array>(
    {
      async start() {
        try {
          handle = await open(path, 'r');
        } catch (error) {
          throw readError(path, error);
        }
      },
      async pull(controller) {
        if (handle === undefined) return;
        try {
          const buffer = new Uint8Array(CHUNK_BYTES);
          const { bytesRead } = await handle.read(buffer, 0, CHUNK_BYTES, null);
          if (bytesRead === 0) {
            await close();
            controller.close();
            return;
          }
          sent += bytesRead;
          controller.enqueue(buffer.subarray(0, bytesRead));
          onBytes(sent);
        } catch (error) {
          await close();
          throw readError(path, error);
        }
      },
      cancel: close,
    },
    { highWaterMark: 0 },
  );
}
