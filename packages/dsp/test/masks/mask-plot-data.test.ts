import { describe, expect, it } from 'vitest';
import { evaluateMask, maskPlotData } from '../../src/index.js';
import { applyBiquad, mapChannels, peakingEqCoefficients } from '../../src/testing/index.js';
import { FS, SWEEP, flatEnvelope, mask } from './mask-fixtures.js';
import { refusedBy } from '../helpers/refused.js';

describe('maskPlotData', () => {
  const capture = mapChannels(SWEEP, (x) => applyBiquad(x, peakingEqCoefficients(FS, 8000, 2, 2)));
  const input = { capture, reference: SWEEP, transferMethod: 'deconvolution' as const };
  const check = mask(flatEnvelope('flat', 1)).checks[0];
  if (check?.kind !== 'magnitude-envelope') throw new Error('fixture must be an envelope');

  it('decimates into log-spaced columns keeping each column\'s extremes, so the peak survives', () => {
    const plot = maskPlotData(input, check, { columns: 200 });
    expect(plot.hz).toHaveLength(200);
    expect(plot.edgesHz).toHaveLength(201);
    // Equal steps of log frequency: the ratio of neighbouring edges is constant.
    const r = (plot.edgesHz[1] as number) / (plot.edgesHz[0] as number);
    expect((plot.edgesHz[101] as number) / (plot.edgesHz[100] as number)).toBeCloseTo(r, 9);
    for (let i = 0; i < 200; i++) if (plot.measuredMin[i] !== null) expect(plot.measuredMin[i] as number).toBeLessThanOrEqual(plot.measuredMax[i] as number);
    // The highest column maximum is the evaluation's worst value (+2 dB bump, normalised).
    const evaluated = evaluateMask(input, mask(flatEnvelope('flat', 1))).checks[0];
    expect(Math.max(...plot.measuredMax.map((v) => v ?? -Infinity))).toBeCloseTo(evaluated?.measured as number, 12);
    expect(plot.upperAt.every((v) => v === 1)).toBe(true);
    expect(plot.upper).toEqual([{ hz: 50, db: 1 }, { hz: 16000, db: 1 }]);
  });

  it('marks the failing region around 8 kHz', () => {
    const plot = maskPlotData(input, check, { columns: 64 });
    expect(plot.failingRegions.some((r) => r.fromHz < 8000 && r.toHz > 8000)).toBe(true);
    expect(() => maskPlotData(input, check, { columns: 0 })).toThrow(refusedBy('maskPlotData'));
  });
});
