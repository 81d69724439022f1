import type { BuildDetail, BuildRow, BuildStatus, CaptureDto, CheckResultDto } from '@earmark/contracts';
import type { CaptureFile } from './capture-file.js';
import { captureOutcome, type CaptureOutcome } from './capture-outcome.js';

export interface SubmittedCapture {
  file: CaptureFile;
  capture: CaptureDto;
}

const WORD: Record<CaptureOutcome, string> = { pass: 'PASS', fail: 'FAIL', error: 'ERROR', pending: 'PENDING' };

/** A number for people: one decimal for ordinary values, two significant digits for small ones, a true minus sign. */
export function formatValue(value: number): string {
  const abs = Math.abs(value);
  const text = abs >= 1000 ? abs.toFixed(0) : abs >= 1 || abs === 0 ? abs.toFixed(1) : abs.toPrecision(2);
  return value < 0 && Number(text) !== 0 ? `\u2212${text}` : text;
}

export function formatHz(hz: number): string {
  if (hz < 1000) return `${Math.round(hz)} Hz`;
  return `${(hz / 1000).toFixed(2).replace(/\.?0+$/, '')} kHz`;
}

const withUnit = (value: number, unit: string | null): string => (unit ? `${formatValue(value)} ${unit}` : formatValue(value));

/** `mag.env margin −1.3 dB at 8.02 kHz (measured 4.2 dB, limit 2.9 dB)`; parts the server left null are left out. */
export function describeFailedCheck(check: CheckResultDto): string {
  let text = check.label ?? check.id;
  if (check.margin !== null) text += ` margin ${check.margin > 0 ? '+' : ''}${withUnit(check.margin, check.unit)}`;
  if (check.worstHz !== null) text += ` at ${formatHz(check.worstHz)}`;
  const values = [
    ...(check.measured === null ? [] : [`measured ${withUnit(check.measured, check.unit)}`]),
    ...(check.limit === null ? [] : [`limit ${withUnit(check.limit, check.unit)}`]),
  ];
  return values.length > 0 ? `${text} (${values.join(', ')})` : text;
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
