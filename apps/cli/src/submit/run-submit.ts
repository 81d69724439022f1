import { writeFile } from 'node:fs/promises';
import type { BuildDetail, BuildRow } from '@earmark/contracts';
import { ApiClient, type RetryNotice } from '../api-client/api-client.js';
import { EarmarkApi } from '../api-client/earmark-api.js';
import { EXIT } from '../cli-error.js';
import { MEDIA_TYPE, type CaptureFile } from './capture-file.js';
import { captureOutcome } from './capture-outcome.js';
import { fileBody } from './file-body.js';
import { formatJson, formatSummary, type SubmittedCapture } from './format-summary.js';
import { idempotencyKey } from './idempotency-key.js';
import { exitCodeFor, submittedStatus } from './submit-outcome.js';
import type { SubmitPlan } from './submit-options.js';
import type { SubmitProgress } from './submit-progress.js';
import { waitForVerdicts } from './wait-for-verdicts.js';

export interface SubmitIo {
  stdout: NodeJS.WritableStream;
  progress: SubmitProgress;
}

/** Raised after the report is printed when --wait ran out of time; the command exits 3 with it (not judged yet). */
export class WaitTimeoutError extends Error {
  override readonly name = 'WaitTimeoutError';
}

function retryLine(n: RetryNotice): string {
  return `${n.request}: ${n.reason}; trying again in ${Math.max(1, Math.round(n.delayMs / 1000))} s (try ${n.nextTry} of ${n.maxTries})`;
}

function uploadHeaders(plan: SubmitPlan, file: CaptureFile): { contentType: string; formatHeaders: Record<string, string>; format: string } {
  if (file.format === 'wav') return { contentType: MEDIA_TYPE.wav, formatHeaders: {}, format: MEDIA_TYPE.wav };
  // planSubmit guarantees --rate/--channels whenever a raw file is present.
  const raw = plan.raw ?? { sampleRate: 0, channels: 0 };
  return {
    contentType: MEDIA_TYPE['raw-f32'],
    formatHeaders: { 'x-sample-rate': String(raw.sampleRate), 'x-channels': String(raw.channels) },
    format: `${MEDIA_TYPE['raw-f32']};rate=${raw.sampleRate};channels=${raw.channels}`,
  };
}

async function uploadAll(api: EarmarkApi, plan: SubmitPlan, progress: SubmitProgress): Promise<SubmittedCapture[]> {
  const submitted: SubmittedCapture[] = [];
  // One at a time: a rig's captures share one uplink, and the order of the report follows the command line.
  for (const file of plan.files) {
    const { contentType, formatHeaders, format } = uploadHeaders(plan, file);
    progress.uploadStarted(file);
    const { capture, reused } = await api.uploadCapture({
      project: plan.project,
      sha: plan.build.sha,
      testCase: plan.testCase,
      ...(plan.target === undefined ? {} : { target: plan.target }),
      contentType,
      formatHeaders,
      idempotencyKey: idempotencyKey({ project: plan.project, sha: plan.build.sha, testCase: plan.testCase, target: plan.target, fileSha256: file.sha256, format }),
      sizeBytes: file.sizeBytes,
      body: () => fileBody(file.path, (sent) => progress.uploadBytes(sent)),
    });
    progress.uploadDone(file, capture, reused);
    submitted.push({ file, capture });
  }
  return submitted;
}

function pendingList(submitted: SubmittedCapture[]): string {
  return submitted
    .filter((s) => captureOutcome(s.capture) === 'pending')
    .map((s) => `${s.capture.testCase}/${s.capture.target} ${s.file.name} (${s.capture.status}, capture ${s.capture.id})`)
    .join(', ');
}

/**
 * `earmark submit` once the plan is checked: create the build, upload each capture under
 * its Idempotency-Key, optionally wait for the verdicts and fetch the JUnit report, print
 * the report. Returns the exit code; throws for errors that end the run with exit 3.
 */
export async function runSubmit(plan: SubmitPlan, io: SubmitIo): Promise<number> {
  const { progress } = io;
  const client = new ApiClient({ server: plan.server, token: plan.token, onRetry: (n) => progress.note(retryLine(n)) });
  const api = new EarmarkApi(client);
  try {
    const { created, build: row } = await api.upsertBuild(plan.project, plan.build);
    progress.note(`build ${row.sha} ${created ? 'created' : 'found'} in ${row.projectKey}`);
    let build: BuildRow | Omit<BuildDetail, 'captures'> = row;
    let dashboard = api.dashboardUrl(plan.project, plan.build.sha);
    let submitted = await uploadAll(api, plan, progress);

    let timedOut = false;
    if (plan.waitTimeoutMs !== undefined) {
      const waited = await waitForVerdicts(
        api,
        submitted.map((s) => s.capture),
        { timeoutMs: plan.waitTimeoutMs, progress },
      );
      timedOut = waited.timedOut;
      submitted = submitted.map((s, i) => ({ file: s.file, capture: waited.captures[i] ?? s.capture }));
      if (!timedOut) {
        // Its captures are in the report already, paired with their files.
        const { captures: _captures, ...detail } = await api.getBuild(plan.project, plan.build.sha);
        build = detail;
        // The server's own link wins; a relative one is resolved against --server.
        dashboard = new URL(detail.links.dashboard, plan.server).toString();
      }
    }

    const captures = submitted.map((s) => s.capture);
    const exitCode = timedOut ? EXIT.incomplete : exitCodeFor(captures, plan.waitTimeoutMs !== undefined);
    if (plan.junitPath !== undefined && !timedOut) {
      const xml = await api.getJunit(plan.project, plan.build.sha);
      await writeFile(plan.junitPath, xml);
      progress.note(`wrote JUnit report ${plan.junitPath}`);
    }
    io.stdout.write(
      plan.json
        ? formatJson({ outcome: submittedStatus(captures), exitCode, timedOut, dashboard, build }, submitted)
        : formatSummary(submitted, dashboard),
    );
    if (timedOut) {
      const pending = submitted.filter((s) => captureOutcome(s.capture) === 'pending').length;
      throw new WaitTimeoutError(
        `timed out after ${(plan.waitTimeoutMs ?? 0) / 1000} s with ${pending} of ${submitted.length} verdicts still pending: ${pendingList(submitted)}`,
      );
    }
    return exitCode;
  } finally {
    progress.stop();
  }
}
