import type { DeriveMaskResponse, MagnitudeEnvelopeCheck, YieldAtGuard } from '@earmark/contracts';
import { act, fireEvent, render, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { AppProvider } from '@/app/provider';
import { createQueryClient } from '@/app/query-client';
import type { CandidateCapture } from '@/features/masks/api/get-candidate-captures';
import { DeriveWizard } from '@/features/masks/components/derive-wizard';
import { addedCheckId, placeDerivedInChecks, yieldAtGuard, yieldHeadline } from '@/features/masks/utils/derive-wizard';
import { json, mockApi, seedSession, type RecordedRequest } from './mock-api';

// uPlot needs a canvas; the figure's name and series count are what matter here.
vi.mock('@/components/plot-figure', () => ({
  PlotFigure: ({ label, data }: { label: string; data: unknown[] }) => <figure aria-label={label} data-series={data.length} />,
}));

const ids = Array.from({ length: 5 }, (_, i) => `00000000-0000-4000-8000-0000000002${String(i).padStart(2, '0')}`);
const candidates: CandidateCapture[] = ids.map((captureId, i) => ({
  captureId,
  target: i === 4 ? 'bench-rig' : 'left-bud',
  outcome: 'pass',
  buildSha: `${i}a1b2c3d4e5f6`,
  branch: 'main',
  label: `golden-unit-0${i + 1}`,
  createdAt: '2025-06-03T08:00:00.000Z',
}));

const check: MagnitudeEnvelopeCheck = {
  kind: 'magnitude-envelope',
  id: 'derived-envelope',
  measure: 'transfer',
  upper: [
    { hz: 20, db: 1.1 },
    { hz: 2700, db: 0.9 },
    { hz: 20000, db: 1.6 },
  ],
  lower: [
    { hz: 20, db: -1.2 },
    { hz: 20000, db: -1.7 },
  ],
};

/** Rates that fall with the guard band (0.25 − guard/10), tabulated over 0…3 dB. */
const row = (guardDb: number): YieldAtGuard => {
  const rate = Math.max(0, 0.25 - guardDb / 10);
  return {
    guardDb,
    leaveOneOut: { rate, low: rate / 2, high: Math.min(1, rate * 2 + 0.1), n: 5, failures: Math.round(rate * 5) },
    parametric: { rate: rate / 2, correlatedBound: rate / 4, independentBound: rate, effectiveBands: 50 },
  };
};

function response(captureIds: string[], guardDb: number, withOutlier: boolean): DeriveMaskResponse {
  const hz = [20, 200, 2000, 20000];
  return {
    check,
    stats: {
      captures: captureIds.length,
      channel: 0,
      unit: 'dB',
      hz,
      mean: [0, 0, 0, 0],
      std: [0.2, 0.2, 0.2, 0.2],
      upperRaw: [0.9, 0.9, 0.9, 0.9],
      lowerRaw: [-0.9, -0.9, -0.9, -0.9],
      pointsUsed: 900,
      maxDeviationDb: { upper: 0.4, lower: 0.3, overall: 0.4 },
      maxStrayDb: 0,
      worstGoldenMarginDb: 0.31,
      curves: captureIds.map(() => [0, 0.1, -0.1, 0]),
    },
    derivation: { captureIds, k: 3, guardDb, maxSegments: 12, smoothing: 6, referenceHz: 1000, measure: 'transfer', channel: 0, bandHz: [20, 20000], engineVersion: 'test', maxDeviationDb: 0.4, derivedAt: '2025-06-03T08:00:00.000Z' },
    yieldEstimate: { ...row(guardDb), byGuardBandDb: Array.from({ length: 31 }, (_, i) => row(i / 10)) },
    outliers: withOutlier
      ? [
          {
            captureId: ids[2]!,
            target: 'left-bud',
            regions: [{ fromHz: 6300, toHz: 8180, deviationDb: 3.104, sigmas: 9.84, atHz: 7100 }],
            worst: { fromHz: 6300, toHz: 8180, deviationDb: 3.104, sigmas: 9.84, atHz: 7100 },
          },
        ]
      : [],
    warnings: captureIds.includes(ids[4]!)
      ? [{ code: 'mixed-targets', targets: ['bench-rig', 'left-bud'], message: 'The golden captures come from 2 targets: bench-rig (1), left-bud (4).' }]
      : [],
  };
}

function setup(onUse = vi.fn()) {
  seedSession();
  const derives: RecordedRequest[] = [];
  mockApi({
    'POST /api/projects/kestrel-buds/test-cases/eq.sweep/masks/derive': (request) => {
      derives.push(request);
      const body = request.body as { captureIds: string[]; guardDb: number };
      return json(response(body.captureIds, body.guardDb, body.captureIds.includes(ids[2]!)));
    },
  });
  const queryClient = createQueryClient();
  render(
    <AppProvider queryClient={queryClient}>
      <DeriveWizard projectKey="kestrel-buds" caseKey="eq.sweep" open onClose={() => undefined} candidates={candidates} envelopeIds={['eq-response', 'anc-floor']} checkIds={['eq-response', 'anc-floor', 'level']} replaceId="eq-response" onUse={onUse} />
    </AppProvider>,
  );
  return { derives, onUse, dialog: screen.getByRole('dialog', { name: 'Derive limits from golden captures' }) };
}

describe('derive wizard helpers', () => {
  it('replaces a check in place under its own id, or adds one under a free id', () => {
    const level = { kind: 'level', id: 'level', metric: 'rms-dbfs', max: 0 } as const;
    const old = { ...check, id: 'eq-response', upper: [{ hz: 20, db: 3 }] };
    expect(placeDerivedInChecks([old, level], check, { mode: 'replace', checkId: 'eq-response' })).toEqual([{ ...check, id: 'eq-response' }, level]);
    expect(placeDerivedInChecks([old, level], check, { mode: 'add' })).toEqual([old, level, check]);
    expect(addedCheckId(['derived-envelope', 'derived-envelope-2'])).toBe('derived-envelope-3');
    // Replacing a check that is not there adds instead of losing the proposal.
    expect(placeDerivedInChecks([level], check, { mode: 'replace', checkId: 'gone' })).toEqual([level, check]);
  });

  it('reads the rate at the nearest tabulated guard band and says it in words', () => {
    const estimate = { ...row(0.5), byGuardBandDb: Array.from({ length: 31 }, (_, i) => row(i / 10)) };
    expect(yieldAtGuard(estimate, 0.74)!.guardDb).toBe(0.7);
    // The headline is the parametric rate, which moves smoothly with the guard band.
    expect(yieldHeadline(row(0.5))).toBe('about 10 % of good units would fail');
    expect(yieldHeadline({ ...row(0.5), leaveOneOut: null })).toBe('about 10 % of good units would fail');
  });
});

describe('derive wizard', () => {
  it('previews the new check with its breakpoints, flags the outlier by name, warns of mixed targets', async () => {
    const { dialog, derives } = setup();
    const user = userEvent.setup();
    await user.click(within(dialog).getByRole('button', { name: 'Preview limits' }));
    await within(dialog).findByRole('figure', { name: 'New check preview' });
    expect(derives[0]!.body).toMatchObject({ captureIds: ids, guardDb: 0.5, k: 3, maxSegments: 12, smoothing: 6 });
    // One series per golden capture besides frequency, mean and the two limits.
    expect(within(dialog).getByRole('figure', { name: 'New check preview' }).getAttribute('data-series')).toBe(String(1 + 5 + 3));
    expect(within(dialog).getByRole('heading', { name: /New check eq-response — replaces its current limits/ })).toBeTruthy();
    const upper = within(dialog).getByRole('list', { name: 'Upper limit breakpoints' });
    expect(within(upper).getAllByRole('listitem').map((li) => li.textContent)).toEqual(['20 Hz +1.10 dB', '2.7 kHz +0.90 dB', '20 kHz +1.60 dB']);
    expect(within(dialog).getByRole('list', { name: 'Lower limit breakpoints' }).textContent).toContain('20 kHz −1.70 dB');

    expect(within(dialog).getByRole('alert').textContent).toContain('Targets mixed: bench-rig, left-bud.');
    const outliers = within(dialog).getByRole('region', { name: 'Outlying golden captures' });
    expect(outliers.textContent).toContain('2a1b2c3 golden-unit-03 · left-bud — 6.3 kHz–8.18 kHz: +3.10 dB (9.84σ) at 7.1 kHz');

    // Leaving the outlier out derives again without it.
    await user.click(within(outliers).getByRole('button', { name: 'Leave out and derive again' }));
    await waitFor(() => expect(derives).toHaveLength(2));
    expect((derives[1]!.body as { captureIds: string[] }).captureIds).toEqual(ids.filter((id) => id !== ids[2]));
    await waitFor(() => expect(within(dialog).queryByRole('region', { name: 'Outlying golden captures' })).toBeNull());
  });

  it('moves the yield estimate with the guard slider at once, then re-derives the limits at that guard', async () => {
    const { dialog, derives, onUse } = setup();
    const user = userEvent.setup();
    await user.click(within(dialog).getByRole('button', { name: 'Preview limits' }));
    const status = await within(dialog).findByText(/of good units would fail/);
    expect(status.textContent).toBe('about 10 % of good units would fail');
    expect(within(dialog).getByRole('region', { name: 'Yield estimate' }).textContent).toContain('Leave-one-out: 1 of 5 left-out captures fail (20 %; 95 % interval 10 % to 50 %)');

    vi.useFakeTimers({ shouldAdvanceTime: true });
    try {
      fireEvent.change(within(dialog).getByLabelText('Guard band'), { target: { value: '1.2' } });
      // Read from the table: no request yet, and "Use as draft" waits for limits at 1.2 dB.
      expect(within(dialog).getByText(/of good units would fail/).textContent).toBe('about 6.5 % of good units would fail');
      expect(derives).toHaveLength(1);
      expect((within(dialog).getByRole('button', { name: 'Use as draft' }) as HTMLButtonElement).disabled).toBe(true);
      await act(async () => {
        await vi.advanceTimersByTimeAsync(450);
      });
    } finally {
      vi.useRealTimers();
    }
    await waitFor(() => expect(derives).toHaveLength(2));
    expect(derives[1]!.body).toMatchObject({ guardDb: 1.2, captureIds: ids });
    await waitFor(() => expect((within(dialog).getByRole('button', { name: 'Use as draft' }) as HTMLButtonElement).disabled).toBe(false));

    // Add instead of replace.
    await user.click(within(dialog).getByRole('radio', { name: 'Add beside the other checks' }));
    expect(within(dialog).getByRole('heading', { name: /New check derived-envelope — added beside the other checks/ })).toBeTruthy();
    await user.click(within(dialog).getByRole('button', { name: 'Use as draft' }));
    expect(onUse).toHaveBeenCalledWith(check, { mode: 'add' });
  });
});
