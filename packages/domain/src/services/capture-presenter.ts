import type { EntityManager } from '@mikro-orm/postgresql';
import { JudgingSettings, type CaptureDto, type CheckResultDto, type VerdictDto } from '@earmark/contracts';
import { CheckResult, type Capture, type Verdict } from '@earmark/db';
import type { Links } from './links.js';
import { newestVerdicts } from '../repositories/verdicts.js';
import { verdictWaiver, waiverMarkOf } from '../judging/waiver-coverage.js';

/** The newest verdict of each capture with its check results, in two queries. */
export async function latestVerdicts(em: EntityManager, captures: Capture[]): Promise<Map<string, VerdictDto>> {
  if (captures.length === 0) return new Map();
  const newest = await newestVerdicts(em, captures.map((c) => c.id), ['maskRevision', 'previous', 'previous.maskRevision']);
  if (newest.size === 0) return new Map(); // no verdict yet (a fresh upload): no check results to look for
  const previousIds = [...newest.values()].flatMap((v) => (v.previous ? [v.previous.id] : []));
  const checks = await em.find(CheckResult, { verdict: { $in: [...newest.values()].map((v) => v.id) } }, { orderBy: { checkId: 'asc' } });
  const previousChecks = previousIds.length ? await em.find(CheckResult, { verdict: { $in: previousIds } }) : [];
  const byVerdict = new Map<string, CheckResultDto[]>();
  for (const c of checks) {
    const list = byVerdict.get(c.verdict.id) ?? [];
    list.push({
      id: c.checkId,
      kind: c.kind,
      label: typeof c.details.label === 'string' ? c.details.label : null,
      pass: c.pass,
      measured: c.measured,
      limit: c.limit,
      margin: c.margin,
      unit: typeof c.details.unit === 'string' ? c.details.unit : null,
      worstHz: c.worstHz,
      ...(c.details.waived ? { waived: true } : {}),
      waiver: waiverMarkOf(c.details),
      ...(Array.isArray(c.details.warnings) && c.details.warnings.length ? { warnings: c.details.warnings.filter((w): w is string => typeof w === 'string') } : {}),
      ...(typeof c.details.error === 'string' ? { error: c.details.error } : {}),
      channel: typeof c.details.channel === 'number' ? c.details.channel : null,
    });
    byVerdict.set(c.verdict.id, list);
  }
  return new Map(
    [...newest.entries()].map(([captureId, v]) => [
      captureId,
      {
        outcome: v.outcome,
        reason: v.reason,
        engineVersion: v.engineVersion,
        maskRevisionId: v.maskRevision?.id ?? null,
        maskRevision: v.maskRevision?.revision ?? null,
        createdAt: v.createdAt.toISOString(),
        settings: recordedSettings(v.settings),
        ...(v.previous
          ? {
              previousOutcome: v.previous.outcome,
              previousEngineVersion: v.previous.engineVersion,
              previousMaskRevision: v.previous.maskRevision?.revision ?? null,
              changes: checkChanges(previousChecks.filter((c) => c.verdict.id === v.previous?.id), checks.filter((c) => c.verdict.id === v.id)),
            }
          : {}),
        checks: byVerdict.get(v.id) ?? [],
        waiver: verdictWaiver(v.outcome, (byVerdict.get(v.id) ?? []).map((c) => c.waiver ?? null)),
      },
    ]),
  );
}

/** The settings a verdict recorded, as the contracts read them; null when not recorded (or no longer readable). */
function recordedSettings(stored: Verdict['settings']): VerdictDto['settings'] {
  if (!stored) return null;
  const parsed = JudgingSettings.safeParse(stored);
  return parsed.success ? parsed.data : null;
}

/** A measured value changes when it moves by more than this fraction (or the result flips). */
const CHANGE_TOLERANCE = 1e-6;

/** The checks of a re-evaluation whose result or number differs from the verdict it replaced. */
export function checkChanges(before: readonly CheckResult[], after: readonly CheckResult[]): NonNullable<VerdictDto['changes']> {
  const old = new Map(before.map((c) => [c.checkId, c]));
  const ids = [...new Set([...after.map((c) => c.checkId), ...before.map((c) => c.checkId)])].sort();
  const now = new Map(after.map((c) => [c.checkId, c]));
  const moved = (a: number | null, b: number | null) => (a === null || b === null ? a !== b : Math.abs(a - b) > CHANGE_TOLERANCE * Math.max(1, Math.abs(a)));
  return ids.flatMap((checkId) => {
    const b = old.get(checkId) ?? null;
    const a = now.get(checkId) ?? null;
    if (a && b && a.pass === b.pass && !moved(a.measured, b.measured)) return [];
    const unit = typeof (a ?? b)?.details.unit === 'string' ? ((a ?? b)?.details.unit as string) : null;
    return [{ checkId, unit, before: b ? { pass: b.pass, measured: b.measured } : null, after: a ? { pass: a.pass, measured: a.measured } : null }];
  });
}

/** Captures must have project, build, testCase and target loaded. */
export function toCaptureDto(capture: Capture, verdict: VerdictDto | null, links: Links): CaptureDto {
  const project = capture.project.key;
  const sha = capture.build.sha;
  return {
    id: capture.id,
    projectKey: project,
    buildSha: sha,
    testCase: capture.testCase.key,
    target: capture.target.key,
    status: capture.status,
    sha256: capture.sha256,
    sizeBytes: capture.sizeBytes,
    sampleRate: capture.sampleRate,
    channels: capture.channelCount,
    frames: capture.frames,
    createdAt: capture.createdAt.toISOString(),
    purgedAt: capture.purgedAt?.toISOString() ?? null,
    verdict,
    links: { self: links.captureApi(capture.id), build: links.buildApi(project, sha), dashboard: links.capturePage(project, sha, capture.id) },
  };
}

export async function presentCaptures(em: EntityManager, captures: Capture[], links: Links): Promise<CaptureDto[]> {
  const verdicts = await latestVerdicts(em, captures);
  return captures.map((c) => toCaptureDto(c, verdicts.get(c.id) ?? null, links));
}
