import { describeCheckValues } from '@earmark/contracts';
import type { Links } from '../services/links.js';
import { buildName, checkName, formatDay, plural } from './mail-format.js';
import type { Inline, ListItem, MailMessage } from './mail-message.js';
import { renderMail } from './render-mail.js';

/** A check of a cell that the mail reports: failing, not measurable, or passed with a waiver. */
export interface ReportedCheck {
  id: string;
  label: string | null;
  measured: number | null;
  limit: number | null;
  margin: number | null;
  unit: string | null;
  worstHz: number | null;
  /** Why the check could not be measured. */
  error: string | null;
  /** ISO date until which an approved waiver covers this check. */
  waivedUntil: string | null;
}

/** One capture of the build (a test case × target) with its newest verdict. */
export interface ReportedCell {
  testCase: string;
  target: string;
  captureId: string;
  outcome: 'pass' | 'fail' | 'error';
  /** The verdict's reason (why it errored). */
  reason: string | null;
  /** Its checks that did not simply pass. */
  checks: ReportedCheck[];
}

export interface BuildFailedInput {
  project: { key: string; name: string };
  build: { sha: string; branch: string | null; label: string | null };
  /** The build's final status by the contracts' rule. */
  status: 'fail' | 'error';
  cells: ReportedCell[];
  links: Pick<Links, 'buildPage' | 'capturePage' | 'settingsPage'>;
}

/** "Flat ±1 dB (response): measured 2.04 dB, limit 1.00 dB, margin −1.04 dB at 8.02 kHz". */
export function describeReportedCheck(c: ReportedCheck): string {
  const name = checkName(c.id, c.label);
  if (c.waivedUntil) return `${name}: passed with waiver, until ${formatDay(c.waivedUntil)}`;
  if (c.error) return `${name}: could not be measured: ${c.error}`;
  const values = describeCheckValues(c);
  return `${name}: ${values === 'no values' ? 'failed' : values}`;
}

const cellName = (c: ReportedCell) => `${c.testCase} on ${c.target}`;
const cellKey = (c: ReportedCell) => `${c.testCase}\u0000${c.target}`;

/**
 * The mail to a project's subscribers when a build's final status is `fail` or `error`: every
 * failing and erroring capture of the build with its checks and a link to its page, waived
 * checks as "passed with waiver", and the build's page.
 */
export function composeBuildFailedMail(input: BuildFailedInput): MailMessage {
  const { project, build, status, links } = input;
  const link = (c: ReportedCell): Inline[] => ['Capture: ', { href: links.capturePage(project.key, build.sha, c.captureId) }];
  const failing = input.cells.filter((c) => c.outcome === 'fail');
  const erroring = input.cells.filter((c) => c.outcome === 'error');
  const waivedOnly = input.cells.filter((c) => c.outcome === 'pass' && c.checks.some((k) => k.waivedUntil));

  const failingItem = (c: ReportedCell): ListItem => ({ content: [cellName(c)], details: [...c.checks.map((k) => [describeReportedCheck(k)]), link(c)] });
  // The reason usually repeats a check's error; the check lines add only what it does not say.
  const erroringItem = (c: ReportedCell): ListItem => ({
    content: [cellName(c)],
    details: [
      [c.reason ?? 'The capture could not be judged.'],
      ...c.checks.filter((k) => !(k.error && c.reason?.includes(k.error))).map((k) => [describeReportedCheck(k)]),
      link(c),
    ],
  });
  const waivedItem = (c: ReportedCell): ListItem => ({
    content: [cellName(c)],
    details: [...c.checks.filter((k) => k.waivedUntil).map((k) => [describeReportedCheck(k)]), link(c)],
  });

  const counts = [
    failing.length ? plural(new Set(failing.map(cellKey)).size, 'failing cell') : null,
    erroring.length ? plural(new Set(erroring.map(cellKey)).size, 'erroring cell') : null,
  ].filter((c): c is string => c !== null);
  const verb = status === 'error' ? 'has errors' : 'failed';
  const sha = build.sha.slice(0, 10);

  return renderMail({
    kind: 'build-failed',
    subject: `[Earmark] ${project.key} build ${sha} ${verb}${counts.length ? `: ${counts.join(', ')}` : ''}`,
    blocks: [
      {
        type: 'paragraph',
        content: [
          `Build ${buildName(build)} of ${project.name} ${verb}` +
            (status === 'error' ? ': some captures could not be judged, so the gate cannot tell whether it meets its masks.' : ': captures are out of tolerance.'),
        ],
      },
      ...(failing.length ? [{ type: 'list' as const, title: 'Failed', items: failing.map(failingItem) }] : []),
      ...(erroring.length ? [{ type: 'list' as const, title: 'Could not be judged', items: erroring.map(erroringItem) }] : []),
      ...(waivedOnly.length ? [{ type: 'list' as const, title: 'Passed with waiver', items: waivedOnly.map(waivedItem) }] : []),
      { type: 'paragraph', content: ['Open the build: ', { href: links.buildPage(project.key, build.sha) }] },
    ],
    footer: {
      reason: `You get this because you subscribed to build-failure mail of ${project.name} (on by default for engineers and QA managers).`,
      manage: { text: 'Change it on the project page', href: links.settingsPage(project.key) },
    },
    payload: { project: project.key, sha: build.sha, status, captureIds: [...failing, ...erroring].map((c) => c.captureId) },
  });
}
