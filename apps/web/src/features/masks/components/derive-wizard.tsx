import { DeriveMaskRequest, formatDecibels, formatMargin, limitAt, type DeriveMaskResponse, type MagnitudeEnvelopeCheck } from '@earmark/contracts';
import { useId, useMemo, useState } from 'react';
import type uPlot from 'uplot';
import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';
import { Select, TextInput } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { PlotFigure } from '@/components/plot-figure';
import { VerdictBadge } from '@/components/verdict-badge';
import { issuesByPath, issuesUnder, type FieldIssues } from '@/lib/field-issues';
import { frequencyAxes, logFrequencyScale, tickDecimals, valueAxis } from '@/lib/plot/axes';
import { plotPalette } from '@/lib/plot/palette';
import { shortSha } from '@/lib/sha';
import type { CandidateCapture } from '../api/get-candidate-captures';
import { useDeriveMask } from '../api/derive-mask';

type Params = { k: string; guardDb: string; maxSegments: string; smoothing: string };

function derivedOptions(unit: string, domain: { min: number; max: number }): () => Omit<uPlot.Options, 'width' | 'height'> {
  return () => ({
    legend: { show: false },
    padding: [12, 16, 0, 0],
    cursor: { drag: { x: false, y: false }, points: { show: false }, y: false },
    scales: { x: logFrequencyScale(domain), y: { auto: true } },
    axes: [...frequencyAxes(), valueAxis(unit === 'dBFS' ? 'Level (dBFS)' : 'Magnitude (dB)', tickDecimals)],
    series: [
      {},
      { label: 'Mean', stroke: plotPalette.ink900, width: 1.5, points: { show: false } },
      { label: 'Mean + kσ + guard', stroke: plotPalette.ink400, width: 1, points: { show: false } },
      { label: 'Mean − kσ − guard', stroke: plotPalette.ink400, width: 1, points: { show: false } },
      { label: 'Upper limit', stroke: plotPalette.brass600, width: 1.75, dash: [6, 4], points: { show: false } },
      { label: 'Lower limit', stroke: plotPalette.brass600, width: 1.75, dash: [6, 4], points: { show: false } },
    ],
    bands: [{ series: [2, 3], fill: plotPalette.measuredBand }],
  });
}

function DerivedPreview({ result }: { result: DeriveMaskResponse }) {
  const { stats, check } = result;
  const data = useMemo<uPlot.AlignedData>(
    () => [
      stats.hz,
      stats.mean,
      stats.upperRaw,
      stats.lowerRaw,
      stats.hz.map((hz) => (check.upper ? limitAt(check.upper, hz) : null)),
      stats.hz.map((hz) => (check.lower ? limitAt(check.lower, hz) : null)),
    ],
    [stats, check],
  );
  const first = stats.hz[0] ?? 20;
  const last = stats.hz[stats.hz.length - 1] ?? 20000;
  const buildOptions = useMemo(() => derivedOptions(stats.unit, { min: first, max: last > first ? last : first * 2 }), [stats.unit, first, last]);
  return (
    <div className="space-y-3">
      <PlotFigure
        label="Derived band"
        summary={`Mean of ${stats.captures} captures with a band of k standard deviations plus the guard, and the simplified limits.`}
        height={260}
        data={data}
        buildOptions={buildOptions}
      />
      <dl className="grid grid-cols-2 gap-x-6 gap-y-1.5 text-sm sm:grid-cols-4">
        {[
          ['Captures', String(stats.captures)],
          ['Breakpoints', `${check.upper?.length ?? 0} upper · ${check.lower?.length ?? 0} lower`],
          ['Max deviation', formatDecibels(stats.maxDeviationDb.overall)],
          ['Worst golden margin', formatMargin(stats.worstGoldenMarginDb, 'dB')],
        ].map(([term, value]) => (
          <div key={term}>
            <dt className="text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">{term}</dt>
            <dd className="font-mono tabular-nums text-ink-950">{value}</dd>
          </div>
        ))}
      </dl>
      <p className="text-xs text-ink-600">
        The deviation is the largest distance between a simplified limit and the raw mean ± (kσ + guard) curve; the simplification only
        widens the band, so every golden capture stays inside it.
      </p>
    </div>
  );
}

/**
 * Derive limits from golden captures: pick passing captures of recent builds and the
 * statistics, preview the mean ± kσ band and the simplified limits the API proposes, then
 * use the proposal as a draft check. Nothing is stored until then.
 */
export function DeriveWizard({
  projectKey,
  caseKey,
  open,
  onClose,
  candidates,
  onUse,
  busy,
}: {
  projectKey: string;
  caseKey: string;
  open: boolean;
  onClose: () => void;
  candidates: CandidateCapture[];
  onUse: (check: MagnitudeEnvelopeCheck) => void;
  busy?: boolean;
}) {
  const derive = useDeriveMask(projectKey, caseKey);
  const [chosen, setChosen] = useState<Set<string>>(() => new Set(candidates.filter((c) => c.outcome === 'pass').slice(0, 8).map((c) => c.captureId)));
  const [params, setParams] = useState<Params>({ k: '3', guardDb: '0.5', maxSegments: '12', smoothing: '6' });
  const [issues, setIssues] = useState<FieldIssues>({});
  const ids = useId();

  const close = () => {
    derive.reset();
    onClose();
  };

  const preview = () => {
    const body = {
      captureIds: candidates.filter((c) => chosen.has(c.captureId)).map((c) => c.captureId),
      k: Number(params.k),
      guardDb: Number(params.guardDb),
      maxSegments: Number(params.maxSegments),
      ...(params.smoothing ? { smoothing: Number(params.smoothing) } : {}),
    };
    const parsed = DeriveMaskRequest.safeParse(body);
    if (!parsed.success) {
      setIssues(issuesByPath(parsed.error));
      return;
    }
    setIssues({});
    derive.mutate(body as typeof parsed.data);
  };

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
      description="Limits at the mean ± (k·σ + guard) of passing captures, simplified to a few straight segments."
      className="w-[min(880px,calc(100vw-2rem))]"
      footer={
        <>
          <Button variant="ghost" onClick={close}>
            Cancel
          </Button>
          <Button variant="secondary" onClick={preview} busy={derive.isPending}>
            Preview limits
          </Button>
          <Button disabled={!derive.data} busy={busy} onClick={() => derive.data && onUse(derive.data.check)}>
            Use as draft
          </Button>
        </>
      }
    >
      <div className="grid gap-5 md:grid-cols-[minmax(0,1fr)_minmax(0,1.6fr)]">
        <div className="space-y-4">
          <fieldset>
            <legend className="mb-1.5 text-[11px] font-semibold uppercase tracking-[0.08em] text-ink-500">
              Golden captures <span className="font-mono normal-case tracking-normal">({chosen.size} chosen)</span>
            </legend>
            {candidates.length === 0 ? (
              <p className="text-sm text-ink-600">No captures of this test case in the recent builds.</p>
            ) : (
              <ul className="max-h-60 space-y-0.5 overflow-y-auto rounded-md border border-line p-1">
                {candidates.map((c) => (
                  <li key={c.captureId}>
                    <label className="flex items-center gap-2 rounded px-2 py-1 text-sm hover:bg-ink-900/5">
                      <input
                        type="checkbox"
                        className="size-4 accent-ink-900"
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
                      <span className="font-mono text-xs">{shortSha(c.buildSha)}</span>
                      <span className="truncate text-ink-700">{c.target}</span>
                      <VerdictBadge verdict={c.outcome} className="ml-auto" />
                    </label>
                  </li>
                ))}
              </ul>
            )}
            {captureIssues.length ? <p className="mt-1 text-xs text-fail">{captureIssues.join('; ')}</p> : null}
          </fieldset>
          <div className="grid grid-cols-2 gap-3">
            {numberField('k', 'k', 'σ')}
            {numberField('guardDb', 'Guard', 'dB')}
            {numberField('maxSegments', 'Segment budget', 'per limit')}
            <div>
              <label htmlFor={`${ids}-smoothing`} className="mb-1 block text-[13px] font-medium text-ink-800">
                Smoothing <span className="ml-1 font-mono text-xs font-normal text-ink-500">(1/N oct)</span>
              </label>
              <Select id={`${ids}-smoothing`} value={params.smoothing} onChange={(e) => setParams((p) => ({ ...p, smoothing: e.target.value }))} className="w-full">
                <option value="">Default</option>
                {['1', '3', '6', '12', '24'].map((n) => (
                  <option key={n} value={n}>
                    1/{n}
                  </option>
                ))}
              </Select>
            </div>
          </div>
        </div>
        <div className="min-w-0">
          {derive.error ? <InlineError error={derive.error} /> : null}
          {derive.data ? (
            <DerivedPreview result={derive.data} />
          ) : (
            <div className="grid h-full min-h-48 place-items-center rounded-md border border-dashed border-line-strong px-6 text-center text-sm text-ink-600">
              Choose at least two passing captures and press “Preview limits” to see the band and the proposed limits.
            </div>
          )}
        </div>
      </div>
    </Dialog>
  );
}
