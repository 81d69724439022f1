import { ENGINE_VERSION } from '@earmark/dsp';
import { route, type RouteDef } from '../http/route.js';

export function healthRoutes(): RouteDef[] {
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
  ];
}
