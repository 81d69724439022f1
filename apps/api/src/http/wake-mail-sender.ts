import type { JobProducer } from '@earmark/domain';
import type { RouteContext } from './route.js';

/**
 * After a handler's transaction committed outbox rows: wake the worker's sender. The rows are
 * safe already, so a queue outage only delays them until the worker's sweep re-queues the job.
 */
export async function wakeMailSender(jobs: JobProducer, ctx: Pick<RouteContext, 'req'>): Promise<void> {
  try {
    await jobs.sendMail('outbox');
  } catch (error) {
    ctx.req.log.warn({ err: error }, 'could not queue send-notifications; the sweep will');
  }
}
