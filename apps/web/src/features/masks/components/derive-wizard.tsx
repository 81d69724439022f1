import { DeriveMaskRequest, formatDecibels, smoothingLabel, type DeriveMaskRequestInput, type MagnitudeEnvelopeCheck } from '@earmark/contracts';
import { useEffect, useId, useMemo, useRef, useState } from 'react';
import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';
import { Select, TextInput } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { VerdictBadge } from '@/components/verdict-badge';
import { issuesByPath, issuesUnder, type FieldIssues } from '@/lib/field-issues';
import { shortSha } from '@/lib/sha';
import type { CandidateCapture } from '../api/get-candidate-captures';
import { useDeriveMask } from '../api/derive-mask';
import { addedCheckId, largestTabulatedGuard, type DerivedPlacement } from '../utils/derive-wizard';
import { DeriveOutliers, DeriveWarnings } from './derive-findings';
import { DerivePreview } from './derive-preview';
import { DeriveYield } from './derive-yield';

type Params = { k: string; maxSegments: string; smoothing: string };

/** How long the guard slider rests before the limits are derived again at its value, ms. */
const GUARD_SETTLE_MS = 400;

/** A golden capture's name: its build (short SHA and label) and target. */
export function captureName(c: CandidateCapture): string {
  return `${c.label ? `${shortSha(c.buildSha)} ${c.label}` : shortSha(c.buildSha)} · ${c.target}`;
}

/**
 * Derive limits from golden captures: pick passing captures and the statistics, preview the NEW
 * check (every capture's curve, outliers flagged, the simplified limits and their breakpoints),
 * read the estimated false-reject rate as the guard band slides, and choose whether the check
 * replaces an envelope check of the draft (default: the one being previewed) or is added.
 * Nothing is stored until the draft is saved.
 */
export function DeriveWizard({
  projectKey,
  caseKey,
  open,
  onClose,
  candidates,
  envelopeIds,
  checkIds,
  replaceId,
  onUse,
  busy,
}: {
  projectKey: string;
  caseKey: string;
  open: boolean;
  onClose: () => void;
  candidates: CandidateCapture[];
  /** Ids of the draft's magnitude-envelope checks (what can be replaced). */
  envelopeIds: readonly string[];
  /** Ids of every check in the draft (an added check gets a free one). */
  checkIds: readonly string[];
  /** The envelope check the derivation is for, replaced by default. */
  replaceId: string | null;
  onUse: (check: MagnitudeEnvelopeCheck, placement: DerivedPlacement) => void;
  busy?: boolean;
}) {
  const derive = useDeriveMask(projectKey, caseKey);
  const [chosen, setChosen] = useState<Set<string>>(() => new Set(candidates.filter((c) => c.outcome === 'pass').slice(0, 8).map((c) => c.captureId)));
  const [params, setParams] = useState<Params>({ k: '3', maxSegments: '12', smoothing: '6' });
  const [guardDb, setGuardDb] = useState(0.5);
  const [issues, setIssues] = useState<FieldIssues>({});
  const [mode, setMode] = useState<'replace' | 'add'>(replaceId ? 'replace' : 'add');
  const [replaced, setReplaced] = useState(replaceId ?? envelopeIds[0] ?? '');
  const lastRequest = useRef<DeriveMaskRequestInput | null>(null);
  const ids = useId();
  const byId = useMemo(() => new Map(candidates.map((c) => [c.captureId, c])), [candidates]);
  const nameOf = (captureId: string) => {
    const c = byId.get(captureId);
    return c ? captureName(c) : captureId;
  };

  const close = () => {
    derive.reset();
    onClose();
  };

  const request = (body: DeriveMaskRequestInput) => {
    lastRequest.current = body;
    derive.mutate(body);
  };

  const preview = (captureIds = candidates.filter((c) => chosen.has(c.captureId)).map((c) => c.captureId)) => {
    const body = {
      captureIds,
      k: Number(params.k),
      guardDb,
      maxSegments: Number(params.maxSegments),
      ...(params.smoothing ? { smoothing: Number(params.smoothing) } : {}),
    };
    const parsed = DeriveMaskRequest.safeParse(body);
    if (!parsed.success) {
      setIssues(issuesByPath(parsed.error));
      return;
    }
    setIssues({});
    request(body as DeriveMaskRequestInput);
  };

  // The slider reads the rate from the response's table at once; once it rests, the limits are
  // derived again at its value so the check that is used matches the number shown.
  const result = derive.data;
  const shownGuard = result?.derivation.guardDb;
  useEffect(() => {
    if (!lastRequest.current || shownGuard === undefined || Math.abs(shownGuard - guardDb) < 1e-9) return;
    const timer = setTimeout(() => {
      if (lastRequest.current) request({ ...lastRequest.current, guardDb });
    }, GUARD_SETTLE_MS);
    return () => clearTimeout(timer);
  }, [guardDb, shownGuard]);
  const limitsFollowGuard = result !== undefined && Math.abs(result.derivation.guardDb - guardDb) < 1e-9;

  const excludeAndDerive = (captureId: string) => {
    const next = new Set(chosen);
    next.delete(captureId);
    setChosen(next);
    const base = lastRequest.current?.captureIds ?? candidates.filter((c) => next.has(c.captureId)).map((c) => c.captureId);
    preview(base.filter((id) => id !== captureId));
  };

  const outlying = useMemo(() => {
    const order = result?.derivation.captureIds ?? [];
    return new Set((result?.outliers ?? []).map((o) => order.indexOf(o.captureId)).filter((i) => i >= 0));
  }, [result]);
  const placement: DerivedPlacement = mode === 'replace' && replaced ? { mode: 'replace', checkId: replaced } : { mode: 'add' };
  const newId = placement.mode === 'replace' ? placement.checkId : addedCheckId(checkIds);
  const guardMax = Math.max(3, largestTabulatedGuard(result?.yieldEstimate), guardDb);

  const numberField = (name: keyof Params, label: string, unit?: string) => (
    <div>
      <label htmlFor={`${ids}-${name}`} className="mb-1 block text-[13px] font-medium text-ink-800">
        {label}
        {unit ? <span className="ml-1 font-mono text-xs font-normal text-ink-500">({unit})</span> : null}
      </label>
      <TextInput
        id={`${ids}-${name}`}
        inputMode="decimal"
        aria-invalid={issues[name]?.length ? true : undefined}
        value={params[name]}
        onChange={(e) => setParams((p) => ({ ...p, [name]: e.target.value }))}
        className="w-full font-mono"
      />
      {issues[name]?.length ? <p className="mt-1 text-xs text-fail">{issues[name].join('; ')}</p> : null}
    </div>
  );

  const captureIssues = issuesUnder(issues, 'captureIds');
  return (
    <Dialog
      open={open}
      onClose={close}
      title="Derive limits from golden captures"
      description="Limits at the mean ± (k·σ + guard) of passing captures, simplified to a few breakpoints at rounded frequencies and 0.1 dB."
      className="w-[min(980px,calc(100vw-1rem))]"
      footer={
        <>
          <Button variant="ghost" onClick={close}>
            Cancel
          </Button>
          <Button variant="secondary" onClick={() => preview()} busy={derive.isPending}>
            Preview limits
          </Button>
          <Button disabled={!result || !limitsFollowGuard || derive.isPending} busy={busy} onClick={() => result && onUse(result.check, placement)}>
            Use as draft
          </Button>
        </>
      }
    >
      <div className="grid gap-5 md:grid-cols-[minmax(0,1fr)_minmax(0,1.7fr)]">
        <div className="min-w-0 space-y-4">
          {/* min-w-0: a fieldset is at least as wide as its content by default, which would widen the dialog on a phone. */}
          <fieldset className="min-w-0">
            <legend className="mb-1.5 text-[11px] font-semibold uppercase tracking-[0.08em] text-ink-500">
              Golden captures <span className="font-mono normal-case tracking-normal">({chosen.size} chosen)</span>
            </legend>
            {candidates.length === 0 ? (
              <p className="text-sm text-ink-600">No captures of this test case in the recent builds.</p>
            ) : (
              <ul className="max-h-60 space-y-0.5 overflow-y-auto rounded-md border border-line p-1">
                {candidates.map((c) => (
                  <li key={c.captureId}>
                    <label className="flex min-w-0 items-center gap-2 rounded px-2 py-1 text-sm hover:bg-ink-900/5">
                      <input
                        type="checkbox"
                        className="size-4 shrink-0 accent-ink-900"
                        checked={chosen.has(c.captureId)}
                        onChange={(e) =>
                          setChosen((set) => {
                            const next = new Set(set);
                            if (e.target.checked) next.add(c.captureId);
                            else next.delete(c.captureId);
                            return next;
                          })
                        }
                      />
                      <span className="min-w-0 flex-1 leading-tight">
                        <span className="block truncate text-ink-900">{c.label ?? shortSha(c.buildSha)}</span>
                        <span className="block truncate font-mono text-[11px] text-ink-500">
                          {shortSha(c.buildSha)} · {c.target}
                        </span>
                      </span>
                      <VerdictBadge verdict={c.outcome} className="ml-auto shrink-0" />
                    </label>
                  </li>
                ))}
              </ul>
            )}
            {captureIssues.length ? <p className="mt-1 text-xs text-fail">{captureIssues.join('; ')}</p> : null}
          </fieldset>
          <div className="grid grid-cols-2 gap-3">
            {numberField('k', 'k', 'σ')}
            {numberField('maxSegments', 'Segment budget', 'per limit')}
            <div>
              <label htmlFor={`${ids}-smoothing`} className="mb-1 block text-[13px] font-medium text-ink-800">
                Smoothing
              </label>
              <Select id={`${ids}-smoothing`} value={params.smoothing} onChange={(e) => setParams((p) => ({ ...p, smoothing: e.target.value }))} className="w-full">
                <option value="">Default</option>
                {[1, 3, 6, 12, 24].map((n) => (
                  <option key={n} value={String(n)}>
                    {smoothingLabel(n)}
                  </option>
                ))}
              </Select>
            </div>
          </div>
          <div>
            <div className="mb-1 flex items-baseline justify-between">
              <label htmlFor={`${ids}-guard`} className="text-[13px] font-medium text-ink-800">
                Guard band
              </label>
              <output htmlFor={`${ids}-guard`} className="font-mono text-sm tabular-nums text-ink-950">
                {formatDecibels(guardDb)}
              </output>
            </div>
            <input
              id={`${ids}-guard`}
              type="range"
              min={0}
              max={guardMax}
              step={0.1}
              value={guardDb}
              aria-valuetext={formatDecibels(guardDb)}
              onChange={(e) => setGuardDb(Math.round(Number(e.target.value) * 10) / 10)}
              className="w-full accent-brass-600"
            />
            {issues.guardDb?.length ? <p className="mt-1 text-xs text-fail">{issues.guardDb.join('; ')}</p> : null}
          </div>
          <fieldset className="min-w-0">
            <legend className="mb-1.5 text-[11px] font-semibold uppercase tracking-[0.08em] text-ink-500">The new check</legend>
            <div className="space-y-1.5 text-sm">
              <label className="flex flex-wrap items-center gap-2">
                <input type="radio" name={`${ids}-mode`} className="accent-ink-900" checked={mode === 'replace'} disabled={envelopeIds.length === 0} onChange={() => setMode('replace')} />
                Replace
                {envelopeIds.length > 1 ? (
                  <Select aria-label="Check to replace" value={replaced} onChange={(e) => setReplaced(e.target.value)} className="h-7 py-0 font-mono text-xs" disabled={mode !== 'replace'}>
                    {envelopeIds.map((id) => (
                      <option key={id} value={id}>
                        {id}
                      </option>
                    ))}
                  </Select>
                ) : (
                  <span className="font-mono text-xs">{envelopeIds[0] ?? '(no envelope check)'}</span>
                )}
              </label>
              <label className="flex items-center gap-2">
                <input type="radio" name={`${ids}-mode`} className="accent-ink-900" checked={mode === 'add'} onChange={() => setMode('add')} />
                Add beside the other checks
              </label>
            </div>
          </fieldset>
        </div>
        <div className="min-w-0 space-y-3">
          {derive.error ? <InlineError error={derive.error} /> : null}
          {result ? (
            <>
              <DeriveWarnings warnings={result.warnings} />
              <DeriveYield estimate={result.yieldEstimate} guardDb={guardDb} />
              <h3 className="text-sm font-semibold text-ink-950">
                New check <span className="font-mono">{newId}</span>{' '}
                <span className="font-normal text-ink-600">
                  {placement.mode === 'replace' ? '— replaces its current limits' : '— added beside the other checks'}
                  {limitsFollowGuard ? '' : ` · updating for ${formatDecibels(guardDb)}…`}
                </span>
              </h3>
              <DerivePreview result={result} checkId={newId} outlying={outlying} />
              <DeriveOutliers outliers={result.outliers} nameOf={nameOf} onExclude={excludeAndDerive} busy={derive.isPending} />
            </>
          ) : (
            <div className="grid h-full min-h-48 place-items-center rounded-md border border-dashed border-line-strong px-6 text-center text-sm text-ink-600">
              Choose at least two passing captures and press “Preview limits” to see the new check, each capture’s curve and the estimated yield.
            </div>
          )}
        </div>
      </div>
    </Dialog>
  );
}
