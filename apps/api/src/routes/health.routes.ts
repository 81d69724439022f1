import { ENGINE_VERSION } from '@earmark/dsp';
import { ReadyReport } from '@earmark/contracts';
import type { HealthProbes } from '@earmark/platform';
import { z } from 'zod';
import { route, type RouteDef } from '../http/route.js';

export function healthRoutes(health: HealthProbes): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/api/health',
      access: { kind: 'public' },
      summary: 'Liveness and database reachability',
      async handle({ res, em }) {
        await em.getConnection().execute('select 1');
        res.json({ status: 'ok', engineVersion: ENGINE_VERSION });
      },
    }),
    route({
      method: 'get',
      path: '/api/health/live',
      access: { kind: 'public' },
      summary: 'Liveness: 200 while the process serves (also while it drains); the same as /livez on the metrics port',
      response: z.object({ live: z.boolean() }),
      async handle({ res }) {
        const live = health.live();
        res.status(live ? 200 : 503).setHeader('Cache-Control', 'no-store').json({ live });
      },
    }),
    route({
      method: 'get',
      path: '/api/health/ready',
      access: { kind: 'public' },
      summary: 'Readiness: 200 when the database, the queue and the object store answer within 2 s; 503 naming the failing check, or while the process drains',
      response: ReadyReport,
      async handle({ res }) {
        const report = await health.ready();
        // This port is public (behind the proxy): which check failed, not its message, which may name
        // internal hosts and the bucket. The metrics port's /readyz carries the messages.
        res.status(report.ready ? 200 : 503).setHeader('Cache-Control', 'no-store').json({ ...report, errors: {} });
      },
    }),
  ];
}
