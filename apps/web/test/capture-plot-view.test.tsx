import type { CaptureDetail, CapturePlot, CheckResultDto, PlotBand } from '@earmark/contracts';
import { describe, expect, it } from 'vitest';
import { bandAt, bandSteps } from '@/features/captures/utils/band-steps';
import { curvesCsv } from '@/features/captures/utils/curves-csv';
import { defaultPlotSelection, spectralChoices } from '@/features/captures/utils/plot-selection';
import { meaningOfPlot, spectrumAxisTitle, spectrumPanelTitle } from '@/features/captures/utils/plot-titles';
import { linearTicks, niceStep, stepDecimals, tickLabel, tickLabels } from '@/lib/plot/ticks';

const MINUS = '\u2212';

describe('linear axis ticks', () => {
  it('labels a 1 s waveform every 0.25 s as 0.25, never rounded to 0.3', () => {
    const { step, ticks } = linearTicks(0, 1, 4);
    expect(step).toBe(0.25);
    expect(ticks).toEqual([0, 0.25, 0.5, 0.75, 1]);
    expect(tickLabels(ticks)).toEqual(['0.00', '0.25', '0.50', '0.75', '1.00']);
  });

  it('gives a phase axis several ticks on round steps with real minus signs', () => {
    const { step, ticks } = linearTicks(-104.5, 9.5, 4);
    expect(step).toBe(25);
    expect(ticks).toEqual([-100, -75, -50, -25, 0]);
    expect(tickLabels(ticks)).toEqual([`${MINUS}100`, `${MINUS}75`, `${MINUS}50`, `${MINUS}25`, '0']);
  });

  it('keeps at least the ticks asked for on a short span, going one round step down when needed', () => {
    // 0.28 s / 4 = 0.07 → 0.1 leaves only 3 ticks (0, 0.1, 0.2); 0.05 gives 6.
    const { step, ticks } = linearTicks(0, 0.28, 4);
    expect(step).toBe(0.05);
    expect(ticks).toHaveLength(6);
    expect(tickLabels(ticks).slice(0, 3)).toEqual(['0.00', '0.05', '0.10']);
    for (const [min, max] of [[-1.08, 1.08], [-60, 6], [0.0201, 0.0313], [-3.3, -2.9], [12000, 12001]] as const) {
      expect(linearTicks(min, max, 4).ticks.length, `${min}…${max}`).toBeGreaterThanOrEqual(4);
    }
  });

  it('rounds steps to 1, 2, 2.5 or 5 times a power of ten and labels each with the decimals it needs', () => {
    expect([0.07, 0.15, 0.22, 0.4, 0.9, 3, 7].map(niceStep)).toEqual([0.1, 0.2, 0.25, 0.5, 1, 5, 10]);
    expect([10, 0.5, 0.25, 0.05, 2.5].map(stepDecimals)).toEqual([0, 1, 2, 2, 1]);
    expect(tickLabel(-0.5, 0.5)).toBe(`${MINUS}0.5`);
    expect(tickLabel(1e-17, 0.1)).toBe('0.0');
    expect(tickLabel(-12.5, 2.5)).toBe(`${MINUS}12.5`);
    expect(linearTicks(5, 5).ticks).toEqual([5]);
  });
});

describe('what the spectrum plots, in its titles', () => {
  it('names a normalised transfer magnitude, an absolute one and a level spectrum', () => {
    const transfer = meaningOfPlot({ unit: 'dB', measure: 'transfer', normalisedAtHz: 1000 });
    expect(spectrumAxisTitle(transfer)).toBe('|H| re 1 kHz, dB');
    expect(spectrumPanelTitle(transfer)).toBe('Transfer magnitude');
    expect(spectrumAxisTitle(meaningOfPlot({ unit: 'dB', measure: 'transfer', normalisedAtHz: 250 }))).toBe('|H| re 250 Hz, dB');
    expect(spectrumAxisTitle(meaningOfPlot({ unit: 'dB', measure: 'transfer', normalisedAtHz: null }))).toBe('|H|, dB');
    const level = meaningOfPlot({ unit: 'dBFS', measure: 'level', normalisedAtHz: null });
    expect([spectrumPanelTitle(level), spectrumAxisTitle(level)]).toEqual(['Level spectrum', 'Level, dBFS']);
    // An answer from before the plot said its measure reads as its unit says.
    expect(spectrumAxisTitle(meaningOfPlot({ unit: 'dBFS' }))).toBe('Level, dBFS');
  });
});

const result = (id: string, over: Partial<CheckResultDto>): CheckResultDto => ({
  id, kind: 'magnitude-envelope', label: null, pass: true, measured: 0, limit: 1, margin: 1, unit: 'dB', worstHz: 1000, channel: 0, ...over,
});

function detailWith(checks: CheckResultDto[], channels = 2): Pick<CaptureDetail, 'mask' | 'capture'> {
  const envelope = (id: string) => ({ kind: 'magnitude-envelope' as const, id, measure: 'transfer' as const, upper: [{ hz: 20, db: 1 }, { hz: 20000, db: 1 }] });
  return {
    mask: {
      id: 'm',
      revision: 3,
      checks: [
        envelope('env-a'),
        { kind: 'level', id: 'rms', metric: 'rms-dbfs', max: 0 },
        envelope('env-b'),
        { kind: 'band-levels', id: 'bands', measure: 'transfer', fraction: 3, bands: [{ centerHz: 1000, max: 1 }] },
      ],
    },
    capture: { channels, verdict: { checks } } as unknown as CaptureDetail['capture'],
  };
}

describe('where the capture page opens', () => {
  it('on the second envelope failing on channel 1, not the first envelope that passes on channel 0', () => {
    const detail = detailWith([
      result('env-a', { pass: true, margin: 0.4, channel: 0 }),
      result('rms', { kind: 'level', pass: false, margin: -3, channel: 0 }),
      result('env-b', { pass: false, margin: -0.83, channel: 1 }),
      result('bands', { kind: 'band-levels', pass: false, margin: -0.2, channel: 0 }),
    ]);
    expect(spectralChoices(detail).map((c) => c.check.id)).toEqual(['env-a', 'env-b', 'bands']);
    expect(defaultPlotSelection(detail)).toEqual({ checkId: 'env-b', channel: 1 });
  });

  it('prefers a plain failure to a waived one, and the smallest margin among failures', () => {
    const waiver = { id: 'w', until: '2027-01-01' };
    const detail = detailWith([
      result('env-a', { pass: false, margin: -5, channel: 1, waiver }),
      result('env-b', { pass: false, margin: -0.1, channel: 0 }),
      result('bands', { kind: 'band-levels', pass: false, margin: -2, channel: 1 }),
    ]);
    expect(defaultPlotSelection(detail)).toEqual({ checkId: 'bands', channel: 1 });
  });

  it('with nothing failing, on the first envelope and the channel closest to its limit, kept inside the capture', () => {
    expect(defaultPlotSelection(detailWith([result('env-a', { channel: 1 }), result('env-b', {})]))).toEqual({ checkId: 'env-a', channel: 1 });
    expect(defaultPlotSelection(detailWith([result('env-a', { channel: 5 })], 2))).toEqual({ checkId: 'env-a', channel: 1 });
    expect(defaultPlotSelection({ mask: null, capture: { channels: 1, verdict: null } as unknown as CaptureDetail['capture'] })).toEqual({ checkId: null, channel: 0 });
  });
});

const band = (lowerHz: number, upperHz: number, measured: number | null, max: number | null, min: number | null = null): PlotBand => ({
  nominalHz: Math.sqrt(lowerHz * upperHz), lowerHz, upperHz, measured, min, max, margin: null, error: null,
});

describe('band levels as steps', () => {
  it('joins adjacent bands with risers and breaks the line at a gap or a band without the value', () => {
    const bands = [band(891, 1122, -2, 1), band(707, 891, -1, 2), band(1122, 1413, -3, null), band(2239, 2818, -4, 3)];
    expect(bandSteps(bands, 'measured')).toEqual([
      [{ hz: 707, value: -1 }, { hz: 891, value: -1 }, { hz: 891, value: -2 }, { hz: 1122, value: -2 }, { hz: 1122, value: -3 }, { hz: 1413, value: -3 }],
      [{ hz: 2239, value: -4 }, { hz: 2818, value: -4 }],
    ]);
    expect(bandSteps(bands, 'max')).toEqual([
      [{ hz: 707, value: 2 }, { hz: 891, value: 2 }, { hz: 891, value: 1 }, { hz: 1122, value: 1 }],
      [{ hz: 2239, value: 3 }, { hz: 2818, value: 3 }],
    ]);
    expect(bandSteps(bands, 'min')).toEqual([]);
    expect(bandAt(bands, 1000)?.lowerHz).toBe(891);
    expect(bandAt(bands, 2000)).toBeNull();
  });
});

describe('the plotted curves as CSV', () => {
  const plot: CapturePlot = {
    channel: 1, checkId: 'env-b', checkKind: 'magnitude-envelope', measure: 'transfer', normalisedAtHz: 1000, unit: 'dB',
    spectrum: { hz: [0, 100, 1000, 10000], min: [null, -0.5, 0, 1.25], max: [null, -0.25, 0.125, 1.5] },
    upper: [{ hz: 100, db: 1 }, { hz: 10000, db: 1 }],
    lower: [{ hz: 100, db: -1 }, { hz: 1000, db: -1 }],
    bands: null, failingRegions: [], worst: null,
    overlay: { captureId: 'c0', buildSha: 'abc', spectrum: { hz: [0, 100, 1000, 10000], min: [null, -0.1, 0, 0.5], max: [null, 0, 0.1, 0.75] } },
    phase: null, groupDelay: null, waveform: { seconds: [], min: [], max: [] }, engineVersion: 'x',
  };

  it('writes one row per plotted column under a header naming each unit, limits where they apply', () => {
    const { csv, rows } = curvesCsv(plot, { includeOverlay: true });
    const lines = csv.trimEnd().split('\n');
    expect(rows).toBe(3);
    expect(lines[0]).toBe('"frequency (Hz)","measured min (dB)","measured max (dB)","upper limit (dB)","lower limit (dB)","last pass min (dB)","last pass max (dB)"');
    expect(lines.slice(1)).toEqual(['100,-0.5,-0.25,1,-1,-0.1,0', '1000,0,0.125,1,-1,0,0.1', '10000,1.25,1.5,1,,0.5,0.75']);
    expect(curvesCsv(plot, { includeOverlay: false }).csv.split('\n')[0]).not.toContain('last pass');
  });

  it('gives a band-levels plot each band’s limits and level across the band', () => {
    const bandsPlot: CapturePlot = { ...plot, checkKind: 'band-levels', upper: null, lower: null, overlay: null, bands: [band(891, 1122, 0.4, 0.3, -2)] };
    const lines = curvesCsv(bandsPlot, { includeOverlay: true }).csv.trimEnd().split('\n');
    expect(lines[0]).toBe('"frequency (Hz)","measured min (dB)","measured max (dB)","upper limit (dB)","lower limit (dB)","band level (dB)"');
    expect(lines.slice(1)).toEqual(['100,-0.5,-0.25,,,', '1000,0,0.125,0.3,-2,0.4', '10000,1.25,1.5,,,']);
  });
});
