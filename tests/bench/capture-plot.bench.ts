// Capture page draw time in a real browser: from the plot data's arrival to the first drawn
// frame of the spectrum with its mask, read from the page's User Timing entries. Runs the
// real stack with the demo history; also serves a 65,536-point spectrum in place of the
// server's decimated one, to show the page's headroom. Run: `npm run bench -- plot`.
import { DEMO_PASSWORD } from '@earmark/db';
import { seedDemoBuilds } from '@earmark/infra/demo-builds';
import { launchBrowser } from '../support/browser.js';
import { createBenchDatabase } from '../support/bench-database.js';
import { startStack } from '../support/stack.js';

const ROUNDS = 7;
const stack = await startStack({ seed: 'demo', database: await createBenchDatabase('earmark_plot_bench') });
const browser = await launchBrowser();
try {
  await stack.startWorker();
  await seedDemoBuilds(stack.url, stack.ciToken, () => {});
  const headers = { authorization: `Bearer ${stack.ciToken}` };
  let captureId = '';
  for (const deadline = Date.now() + 90_000; !captureId; ) {
    const build = (await (await fetch(`${stack.url}/api/v1/projects/kestrel-buds/builds/d19b3f8e44`, { headers })).json()) as { captures: { id: string; testCase: string; verdict: unknown }[] };
    captureId = build.captures.find((c) => c.testCase === 'eq.music.sweep' && c.verdict)?.id ?? '';
    if (!captureId && Date.now() > deadline) throw new Error('the demo capture was not judged in time');
    if (!captureId) await new Promise((r) => setTimeout(r, 500));
  }
  const page = await browser.context.newPage();
  await page.goto(`${stack.url}/sign-in`);
  await page.getByLabel('Email').fill('engineer@fernwick.test');
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('heading', { name: 'Projects' }).waitFor();

  const measure = async (points: number | null): Promise<number[]> => {
    await page.unroute('**/plot*').catch(() => {});
    if (points) {
      // Same curve and mask, densified to `points` log-spaced columns.
      await page.route('**/plot*', async (route) => {
        const res = await route.fetch();
        const plot = (await res.json()) as { spectrum: { hz: number[]; min: (number | null)[]; max: (number | null)[] } };
        const { hz, min, max } = plot.spectrum;
        const dense = { hz: [] as number[], min: [] as (number | null)[], max: [] as (number | null)[] };
        for (let i = 0; i < points; i++) {
          const k = Math.min(hz.length - 1, Math.floor((i / points) * hz.length));
          const lo = hz[0]!;
          const hi = hz[hz.length - 1]!;
          dense.hz.push(lo * (hi / lo) ** (i / (points - 1)));
          dense.min.push(min[k] ?? null);
          dense.max.push(max[k] ?? null);
        }
        await route.fulfill({ response: res, json: { ...plot, spectrum: dense } });
      });
    }
    const times: number[] = [];
    for (let i = 0; i < ROUNDS; i++) {
      await page.goto(`${stack.url}/projects/kestrel-buds/builds/d19b3f8e44/captures/${captureId}`);
      await page.getByRole('region', { name: 'Spectrum' }).locator('canvas').first().waitFor();
      const ms = await page.waitForFunction(() => {
        const entries = performance.getEntriesByName('earmark:spectrum:data-to-first-draw');
        return entries.length ? entries[entries.length - 1]!.duration : null;
      });
      times.push((await ms.jsonValue()) as number);
    }
    return times.sort((a, b) => a - b);
  };
  // The API side: computing the plot data on request (decode, transfer function, envelope, overlay).
  const session = await page.evaluate(() => JSON.parse(localStorage.getItem('earmark.session') ?? '{}').accessToken as string);
  const apiTimes: number[] = [];
  for (let i = 0; i < ROUNDS; i++) {
    const t0 = performance.now();
    const res = await fetch(`${stack.url}/api/projects/kestrel-buds/captures/${captureId}/plot?columns=1200`, { headers: { authorization: `Bearer ${session}` } });
    await res.arrayBuffer();
    if (!res.ok) throw new Error(`plot: HTTP ${res.status}`);
    apiTimes.push(performance.now() - t0);
  }
  // The page load above already filled the cache for its own column count; 1200 is new, so
  // the first request computes and the rest read the object-store cache.
  const [first, ...rest] = apiTimes;
  rest.sort((a, b) => a - b);
  console.log(`\nGET …/captures/{id}/plot?columns=1200 (4.5 s capture, with overlay): computed ${first!.toFixed(0)} ms; cached median ${rest[Math.floor(rest.length / 2)]!.toFixed(0)} ms, max ${rest[rest.length - 1]!.toFixed(0)} ms`);

  const rows = ['| spectrum points | median (ms) | max (ms) |', '|---|---|---|'];
  for (const points of [null, 65_536]) {
    const t = await measure(points);
    rows.push(`| ${points ?? 'server-decimated (page width)'} | ${t[Math.floor(t.length / 2)]!.toFixed(1)} | ${t[t.length - 1]!.toFixed(1)} |`);
  }
  console.log(`\nCapture page: plot data arrival → first drawn spectrum with mask, ${ROUNDS} loads each (target < 300 ms)\n`);
  console.log(rows.join('\n'));
} finally {
  await browser.close();
  await stack.close();
}
