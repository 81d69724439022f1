/** Thrown when a probe or a scrape-time query does not answer in time. */
export class DeadlineError extends Error {
  override name = 'DeadlineError';
}

/**
 * The promise's result, or a DeadlineError after `ms`. The work itself is not cancelled: probes
 * and gauges only stop waiting, so a hung dependency cannot hold up the answer.
 */
export async function withDeadline<T>(work: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const expired = new Promise<never>((_resolve, reject) => {
    timer = setTimeout(() => reject(new DeadlineError(`${what} did not answer within ${ms} ms`)), ms);
  });
  try {
    return await Promise.race([work, expired]);
  } finally {
    clearTimeout(timer);
  }
}
