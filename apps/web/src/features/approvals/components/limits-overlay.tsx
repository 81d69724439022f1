import { useId, useMemo, useState, type ReactNode } from 'react';
import type uPlot from 'uplot';
import { ErrorState } from '@/components/error-state';
import { Select } from '@/components/form-controls';
import { PlotFigure } from '@/components/plot-figure';
import { Skeleton } from '@/components/skeleton';
import { frequencyAxes, logFrequencyScale, tickDecimals, valueAxis } from '@/lib/plot/axes';
import { plotPalette } from '@/lib/plot/palette';
import { shortSha } from '@/lib/sha';
import { useCandidateCaptures, type CandidateCapture } from '@/features/masks/api/get-candidate-captures';
import { usePreviewPlot } from '@/features/masks/api/get-preview-plot';
import { overlayColumns, overlayYRange, type EnvelopePair } from '../utils/limits-overlay';

const HEIGHT = 260;
const OLD_DASH = [6, 4];

function overlayOptions(unit: string, domain: { min: number; max: number } | null): () => Omit<uPlot.Options, 'width' | 'height'> {
  return () => ({
    legend: { show: false },
    padding: [12, 16, 0, 0],
    cursor: { drag: { x: false, y: false }, points: { show: false }, y: false },
    scales: {
      x: logFrequencyScale(domain),
      y: {
        range: (u) => {
          const [hz, max, min, oldUpper, oldLower, newUpper, newLower] = u.data as unknown as (number | null)[][];
          const range = overlayYRange({ hz: hz as number[], max: max!, min: min!, oldUpper: oldUpper!, oldLower: oldLower!, newUpper: newUpper!, newLower: newLower! });
          return [range.min, range.max];
        },
      },
    },
    axes: [...frequencyAxes(), valueAxis(unit === 'dBFS' ? 'Level (dBFS)' : '|H| (dB)', tickDecimals)],
    series: [
      {},
      { label: 'Capture (max)', stroke: plotPalette.ink900, width: 1.25, points: { show: false } },
      { label: 'Capture (min)', stroke: plotPalette.ink900, width: 1.25, points: { show: false } },
      { label: 'Old upper limit', stroke: plotPalette.ink500, width: 1.5, dash: OLD_DASH, points: { show: false } },
      { label: 'Old lower limit', stroke: plotPalette.ink500, width: 1.5, dash: OLD_DASH, points: { show: false } },
      { label: 'New upper limit', stroke: plotPalette.brass600, width: 2, points: { show: false } },
      { label: 'New lower limit', stroke: plotPalette.brass600, width: 2, points: { show: false } },
    ],
    bands: [{ series: [1, 2], fill: plotPalette.measuredBand }],
  });
}

const captureText = (c: CandidateCapture) => `${c.label ? `${shortSha(c.buildSha)} ${c.label}` : shortSha(c.buildSha)} · ${c.target} · ${c.outcome}`;

function LegendLine({ dashed, color, children }: { dashed?: boolean; color: string; children: ReactNode }) {
  return (
    <li className="inline-flex items-center gap-1.5">
      <svg viewBox="0 0 24 12" aria-hidden="true" className="h-3 w-6 shrink-0">
        <path d="M0 6h24" stroke={color} strokeWidth="2" strokeDasharray={dashed ? OLD_DASH.join(' ') : undefined} />
      </svg>
      {children}
    </li>
  );
}

/**
 * Old and new limits of one magnitude envelope over a capture the reviewer picks from this
 * test case's recent builds: old dashed, new solid, so the change is seen against real data.
 */
export function LimitsOverlay({
  projectKey,
  caseKey,
  pairs,
  baseRevision,
  headRevision,
}: {
  projectKey: string;
  caseKey: string;
  pairs: EnvelopePair[];
  baseRevision: number | null;
  headRevision: number;
}) {
  const ids = useId();
  const candidates = useCandidateCaptures(projectKey, caseKey);
  const [captureId, setCaptureId] = useState<string | null>(null);
  const [checkId, setCheckId] = useState<string | null>(null);
  const chosen = captureId ?? candidates.data?.[0]?.captureId ?? null;
  const capture = candidates.data?.find((c) => c.captureId === chosen) ?? null;
  const pair = pairs.find((p) => p.id === checkId) ?? pairs[0] ?? null;
  const plot = usePreviewPlot(projectKey, pair ? chosen : null);
  const spectrum = plot.data?.spectrum ?? null;
  const columns = useMemo(() => (spectrum && pair ? overlayColumns(spectrum, pair) : null), [spectrum, pair]);
  const data = useMemo<uPlot.AlignedData | null>(
    () => (columns ? [columns.hz, columns.max, columns.min, columns.oldUpper, columns.oldLower, columns.newUpper, columns.newLower] : null),
    [columns],
  );
  const unit = pair?.unit ?? 'dB';
  const first = columns?.hz[0] ?? null;
  const last = columns?.hz[columns.hz.length - 1] ?? null;
  const buildOptions = useMemo(() => overlayOptions(unit, first !== null && last !== null && last > first ? { min: first, max: last } : null), [unit, first, last]);

  if (!pair) return <p className="text-sm text-ink-600">This revision has no magnitude envelope to draw; its changes are listed in words.</p>;
  const oldName = baseRevision === null ? 'No earlier limits' : `Old limits (revision ${baseRevision})`;
  const newName = `New limits (revision ${headRevision})`;

  return (
    <section aria-label={`Old and new limits of ${pair.id}`} className="min-w-0 space-y-2">
      <div className="flex flex-wrap items-end gap-3">
        {pairs.length > 1 ? (
          <label className="flex min-w-0 flex-col gap-1 text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">
            Check
            <Select value={pair.id} onChange={(e) => setCheckId(e.target.value)} className="h-8 max-w-full text-xs normal-case tracking-normal">
              {pairs.map((p) => (
                <option key={p.id} value={p.id}>
                  {p.id}
                </option>
              ))}
            </Select>
          </label>
        ) : null}
        <label htmlFor={`${ids}-capture`} className="flex min-w-0 flex-col gap-1 text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">
          Capture to draw under the limits
          <Select
            id={`${ids}-capture`}
            value={chosen ?? ''}
            onChange={(e) => setCaptureId(e.target.value)}
            disabled={!candidates.data?.length}
            className="h-8 w-72 max-w-full text-xs normal-case tracking-normal"
          >
            {candidates.data?.length ? null : <option value="">{candidates.isPending ? 'Loading captures…' : 'No captures in recent builds'}</option>}
            {candidates.data?.map((c) => (
              <option key={c.captureId} value={c.captureId}>
                {captureText(c)}
              </option>
            ))}
          </Select>
        </label>
      </div>
      {candidates.error ? (
        <ErrorState error={candidates.error} />
      ) : plot.isError ? (
        <ErrorState error={plot.error} onRetry={() => void plot.refetch()} />
      ) : chosen === null && !candidates.isPending ? (
        <p className="py-6 text-center text-sm text-ink-600">No capture of this test case in the recent builds to draw the limits over.</p>
      ) : !data ? (
        <Skeleton className="h-[260px] w-full rounded-md" />
      ) : (
        <PlotFigure
          label={`Old and new limits of ${pair.id}`}
          summary={`${newName} drawn solid and ${oldName.toLowerCase()} dashed over capture ${capture ? captureText(capture) : ''}.`}
          height={HEIGHT}
          data={data}
          buildOptions={buildOptions}
        />
      )}
      <ul aria-label="Legend" className="flex flex-wrap items-center gap-x-4 gap-y-1 text-xs text-ink-700">
        <li className="inline-flex items-center gap-1.5">
          <svg viewBox="0 0 24 12" aria-hidden="true" className="h-3 w-6 shrink-0">
            <rect x="0" y="3" width="24" height="6" fill={plotPalette.measuredBand} />
          </svg>
          Capture
          {capture ? (
            <>
              {' '}
              <span className="font-mono">{shortSha(capture.buildSha)}</span>
            </>
          ) : null}
        </li>
        <LegendLine dashed color={plotPalette.ink500}>
          {oldName}
        </LegendLine>
        <LegendLine color={plotPalette.brass600}>{newName}</LegendLine>
      </ul>
    </section>
  );
}
