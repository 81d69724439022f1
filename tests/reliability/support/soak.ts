import { auditConsistency, waitForVerdicts, type ConsistencyAudit } from './audit.js';
import { passingCaptureWav, shaOf, shortSweepSpec, SOAK_CASE, uploadCapture } from './catalog.js';
import type { ProcessStack } from './process-stack.js';

export interface SoakResult {
  accepted: number;
  failedUploads: Record<string, number>;
  seconds: number;
  audit: ConsistencyAudit;
}

const UPLOADERS = 8;

/**
 * `captures` short captures spread evenly over `builds` builds by 8 uploaders; once half are
 * uploaded the first worker is SIGKILLed and a fresh one started (what a crash or an OOM kill
 * does to jobs in flight). An upload refused with 503 (busy) or dropped is retried with the
 * same Idempotency-Key, as the CLI does, so every capture is stored exactly once.
 */
export async function runSoak(stack: ProcessStack, opts: { captures: number; builds: number; drainTimeoutMs: number }): Promise<SoakResult> {
  const wav = passingCaptureWav(shortSweepSpec);
  const run = `${Date.now().toString(16)}`.slice(-8);
  const shas = Array.from({ length: opts.builds }, (_, b) => shaOf(`5a${run}`, b));
  const failedUploads: Record<string, number> = {};
  let next = 0;
  let accepted = 0;
  let killed = false;
  const started = Date.now();
  await Promise.all(
    Array.from({ length: UPLOADERS }, async () => {
      for (let n = next++; n < opts.captures; n = next++) {
        const key = `soak-${run}-${n}`;
        for (let attempt = 1; ; attempt++) {
          const res = await uploadCapture(stack.url, stack.ciToken, shas[n % opts.builds]!, wav, { testCase: SOAK_CASE, headers: { 'idempotency-key': key } });
          if (res.status === 202 || res.status === 200) break; // 200: the same key was stored by an earlier try
          if (attempt >= 5 || ![0, 429, 503].includes(res.status)) {
            failedUploads[res.status] = (failedUploads[res.status] ?? 0) + 1;
            break;
          }
          await new Promise((r) => setTimeout(r, 500 * attempt));
        }
        accepted++;
        if (!killed && accepted >= opts.captures / 2) {
          killed = true;
          await stack.crashWorker(0);
        }
      }
    }),
  );
  await waitForVerdicts(stack.orm, shas, opts.captures, opts.drainTimeoutMs);
  return { accepted, failedUploads, seconds: (Date.now() - started) / 1000, audit: await auditConsistency(stack.orm, stack.objectStore, shas) };
}
