/** An error thrown in a thread, as it crosses back to the caller. */
export interface SerializedTaskError {
  name: string;
  message: string;
  /** The error's own enumerable fields (a code, a limit), so the caller can map it to a domain error. */
  props: Record<string, unknown>;
}

type Task = (input: never) => unknown;

/**
 * Wraps a thread module's tasks so every answer is `{ ok, value | error }`: an error class
 * (AudioDecodeError and its code) does not survive the structured clone, its name and fields do.
 */
export function defineComputeTasks<T extends Record<string, Task>>(tasks: T): { [K in keyof T]: (input: Parameters<T[K]>[0]) => Promise<unknown> } {
  const wrapped: Record<string, (input: never) => Promise<unknown>> = {};
  for (const [name, task] of Object.entries(tasks)) {
    wrapped[name] = async (input: never) => {
      try {
        return { ok: true, value: await task(input) };
      } catch (error) {
        const e = error instanceof Error ? error : new Error(String(error));
        const props: Record<string, unknown> = {};
        for (const [k, v] of Object.entries(e)) if (isCloneable(v)) props[k] = v;
        return { ok: false, error: { name: e.name, message: e.message, props } satisfies SerializedTaskError };
      }
    };
  }
  return wrapped as never;
}

const isCloneable = (v: unknown) => v === null || ['string', 'number', 'boolean'].includes(typeof v) || (Array.isArray(v) && v.every((x) => typeof x !== 'function'));

