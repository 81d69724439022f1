import { describeCheckValues, type BuildDetail, type BuildRow, type BuildStatus, type CaptureDto, type CheckResultDto } from '@earmark/contracts';
import type { CaptureFile } from './capture-file.js';
import { captureOutcome, type CaptureOutcome } from './capture-outcome.js';

export interface SubmittedCapture {
  file: CaptureFile;
  capture: CaptureDto;
}

const WORD: Record<CaptureOutcome, string> = { pass: 'PASS', fail: 'FAIL', error: 'ERROR', pending: 'PENDING' };

/** `mag.env: measured 4.20 dB, limit 2.90 dB, margin −1.30 dB at 8.02 kHz`, in the words of finding titles and JUnit; parts the server left null are left out. */
export function describeFailedCheck(check: CheckResultDto): string {
  return `${check.label ?? check.id}: ${describeCheckValues(check)}`;
}

/** One line per capture: verdict word, test case, target, file, and why when it did not pass. */
export function summaryLine({ file, capture }: SubmittedCapture): string {
  const outcome = captureOutcome(capture);
  const head = `${WORD[outcome].padEnd(7)}  ${capture.testCase}  ${capture.target}  ${file.name}`;
  switch (outcome) {
    case 'fail': {
      const failed = capture.verdict?.checks.filter((c) => !c.pass) ?? [];
      const why = failed.length > 0 ? failed.map(describeFailedCheck).join('; ') : (capture.verdict?.reason ?? 'no check named');
      return `${head}  ${why}`;
    }
    case 'error':
      return `${head}  ${capture.verdict?.reason ?? 'the analysis failed'}`;
    case 'pending':
      return `${head}  (${capture.status})`;
    case 'pass':
      return head;
  }
}

export function countOutcomes(captures: CaptureDto[]): Record<CaptureOutcome, number> {
  const counts: Record<CaptureOutcome, number> = { pass: 0, fail: 0, error: 0, pending: 0 };
  for (const capture of captures) counts[captureOutcome(capture)] += 1;
  return counts;
}

/** The text report on stdout: capture lines, a count line, the dashboard link. */
export function formatSummary(submitted: SubmittedCapture[], dashboard: string): string {
  const counts = countOutcomes(submitted.map((s) => s.capture));
  const parts = (Object.keys(counts) as CaptureOutcome[]).filter((k) => counts[k] > 0).map((k) => `${counts[k]} ${k}`);
  const n = submitted.length;
  return [...submitted.map(summaryLine), `${n} capture${n === 1 ? '' : 's'}: ${parts.join(', ')}`, `dashboard: ${dashboard}`, ''].join('\n');
}

export interface JsonReport {
  /** The build-status rule over this run's captures (pending or running when not waited for or timed out). */
  outcome: BuildStatus;
  exitCode: number;
  timedOut: boolean;
  dashboard: string;
  build: BuildRow | Omit<BuildDetail, 'captures'>;
  captures: Array<{ file: string; path: string; outcome: CaptureOutcome; capture: CaptureDto }>;
}

/** The `--json` report: one object, the server's DTOs unchanged inside it. */
export function formatJson(report: Omit<JsonReport, 'captures'>, submitted: SubmittedCapture[]): string {
  const full: JsonReport = {
    ...report,
    captures: submitted.map(({ file, capture }) => ({ file: file.name, path: file.path, outcome: captureOutcome(capture), capture })),
  };
  return `${JSON.stringify(full, null, 2)}\n`;
}
