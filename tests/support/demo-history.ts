import { seedDemoBuilds } from '@earmark/infra/demo-builds';
import { startStack, type Stack } from './stack.js';
import { waitFor } from './wait-for.js';

/** The demo (Fernwick) with its history sent through the real pipeline and every capture judged. */
export async function startDemoHistory(): Promise<Stack> {
  const stack = await startStack({ seed: 'demo' });
  await stack.startWorker({ EARMARK_ANALYSIS_SLOTS: '2' });
  await seedDemoBuilds(stack.url, stack.ciToken, () => {});
  await waitFor(
    async () => {
      const res = await fetch(`${stack.url}/api/v1/projects/kestrel-buds/builds?pageSize=50`, { headers: { authorization: `Bearer ${stack.ciToken}` } });
      const page = (await res.json()) as { items: { status: string }[] };
      return page.items.length > 0 && page.items.every((b) => b.status !== 'pending' && b.status !== 'running');
    },
    { what: 'every demo build to be judged', timeoutMs: 90_000, intervalMs: 500 },
  );
  return stack;
}
