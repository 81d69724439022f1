import type { CapturePlot, CheckResultDto } from '@earmark/contracts';
import { describe, expect, it } from 'vitest';
import { formatMargin, formatValue, worstPointLabel } from '@/features/captures/utils/check-format';
import { sortChecks } from '@/features/captures/utils/check-order';
import { formatHz, formatHzTick, logFrequencyTicks, panLogRange, rangeAround, zoomLogRange } from '@/lib/plot/log-frequency';
import { allowedZone, alignToColumns, columnsForWidth, failingSpans, spectrumColumns, spectrumYRange } from '@/features/captures/utils/plot-data';
import { tickDecimals } from '@/lib/plot/axes';
import { clampPlaybackLevelDb, dbToGain, gainToDb, PLAYBACK_LEVEL, peakOf, playbackGain } from '@/features/captures/utils/playback-level';

const MINUS = '\u2212';

describe('log-frequency axis', () => {
  it('labels 1-2-5 per decade over the audio band', () => {
    expect(logFrequencyTicks(20, 20000)).toEqual([20, 50, 100, 200, 500, 1000, 2000, 5000, 10000, 20000]);
    expect(logFrequencyTicks(20, 20000).map(formatHzTick)).toEqual(['20', '50', '100', '200', '500', '1k', '2k', '5k', '10k', '20k']);
  });

  it('adds every integer multiple when zoomed into about a decade', () => {
    expect(logFrequencyTicks(4000, 10000)).toEqual([4000, 5000, 6000, 7000, 8000, 9000, 10000]);
  });

  it('falls back to even steps when zoomed far in', () => {
    const ticks = logFrequencyTicks(7900, 8100);
    expect(ticks).toEqual([7900, 7950, 8000, 8050, 8100]);
    expect(ticks.map(formatHzTick)).toEqual(['7.9k', '7.95k', '8k', '8.05k', '8.1k']);
  });

  it('returns no ticks for a range a log axis cannot show', () => {
    expect(logFrequencyTicks(0, 100)).toEqual([]);
    expect(logFrequencyTicks(100, 100)).toEqual([]);
  });

  it('formats frequencies with three significant digits', () => {
    expect(formatHz(8020.4)).toBe('8.02 kHz');
    expect(formatHz(20000)).toBe('20 kHz');
    expect(formatHz(997)).toBe('997 Hz');
    expect(formatHz(31.5)).toBe('31.5 Hz');
  });

  it('zooms and pans in log frequency, inside the measured range', () => {
    const domain = { min: 20, max: 20000 };
    const zoomed = zoomLogRange(domain, 0.5, domain);
    // Half the log span about the geometric middle (632 Hz): 112 Hz … 3.56 kHz.
    expect(zoomed.min).toBeCloseTo(Math.sqrt(20 * Math.sqrt(20 * 20000)), 6);
    expect(zoomed.max / zoomed.min).toBeCloseTo(Math.sqrt(1000), 6);
    // Panning right by the whole width stops at the top of the range, width kept.
    const panned = panLogRange({ min: 1000, max: 4000 }, 10, domain);
    expect(panned.max).toBeCloseTo(20000, 6);
    expect(panned.max / panned.min).toBeCloseTo(4, 6);
    // Zooming out past everything shows everything.
    expect(zoomLogRange(zoomed, 100, domain)).toEqual(domain);
    expect(rangeAround(8000, 1, domain)).toEqual({ min: 4000, max: 16000 });
    expect(rangeAround(15000, 1, domain).max).toBeCloseTo(20000, 6);
  });
});

const plot = (overrides: Partial<CapturePlot> = {}): CapturePlot => ({
  channel: 0,
  checkId: 'eq-response',
  unit: 'dB',
  spectrum: { hz: [0, 100, 1000, 8000, 22000], min: [null, -0.2, -0.1, 2.0, -30], max: [null, 0.1, 0.1, 2.3, -28] },
  upper: [
    { hz: 20, db: 1 },
    { hz: 20000, db: 1 },
  ],
  lower: [
    { hz: 20, db: -3 },
    { hz: 40, db: -1 },
    { hz: 16000, db: -1 },
    { hz: 20000, db: -6 },
  ],
  failingRegions: [],
  worst: { hz: 8000, db: 2.3, margin: -1.3 },
  overlay: null,
  phase: null,
  groupDelay: null,
  waveform: { seconds: [0, 1], min: [-0.5, -0.5], max: [0.5, 0.5] },
  engineVersion: '0.2.0',
  ...overrides,
});

describe('spectrum data for uPlot', () => {
  it('drops the 0 Hz column a log axis cannot place and keeps empty columns as gaps', () => {
    const columns = spectrumColumns(plot());
    expect(columns.hz).toEqual([100, 1000, 8000, 22000]);
    expect(columns.max).toEqual([0.1, 0.1, 2.3, -28]);
    expect(columns.domain).toEqual({ min: 100, max: 22000 });
    expect(columns.overlayMax).toBeNull();
  });

  it('lines the last-pass curve up on the same columns, keeping each column’s extremes', () => {
    const columns = spectrumColumns(
      plot({
        overlay: {
          captureId: 'c-1',
          buildSha: 'abc1234',
          // Decimated differently: two points fall into the 1 kHz column.
          spectrum: { hz: [99.5, 950, 1050, 8100], min: [0, -0.4, -0.2, 0.1], max: [0.05, 0.2, 0.3, 0.2] },
        },
      }),
    );
    expect(columns.overlayMin).toEqual([0, -0.4, 0.1, null]);
    expect(columns.overlayMax).toEqual([0.05, 0.3, 0.2, null]);
    expect(alignToColumns([], { hz: [1], min: [1], max: [1] })).toEqual({ min: [], max: [] });
  });

  it('clips failing regions to the view and merges overlapping ones', () => {
    const regions = [
      { fromHz: 9000, toHz: 12000, worstHz: 10000, worstMargin: -0.2 },
      { fromHz: 5600, toHz: 9500, worstHz: 8000, worstMargin: -1.3 },
      { fromHz: 100, toHz: 200, worstHz: 150, worstMargin: -0.1 },
    ];
    expect(failingSpans(regions, { min: 4000, max: 11000 })).toEqual([{ fromHz: 5600, toHz: 11000 }]);
    expect(failingSpans(regions, { min: 20, max: 20000 })).toEqual([
      { fromHz: 100, toHz: 200 },
      { fromHz: 5600, toHz: 12000 },
    ]);
  });

  it('outlines the allowed zone at every breakpoint of either limit where both apply', () => {
    const p = plot();
    const zone = allowedZone(p.upper, p.lower);
    expect(zone.map((z) => z.hz)).toEqual([20, 40, 16000, 20000]);
    expect(zone.map((z) => z.upper)).toEqual([1, 1, 1, 1]);
    expect(zone.map((z) => z.lower)).toEqual([-3, -1, -1, -6]);
    expect(allowedZone(p.upper, null)).toEqual([]);
  });

  it('ranges dB over the judged band so a roll-off outside the mask does not squash it', () => {
    const p = plot();
    const columns = spectrumColumns(p);
    const range = spectrumYRange(columns, p, { min: 20, max: 22000 }, false);
    // Measured 2.3 dB at most, limits down to −6 dB at 20 kHz; −28 dB at 22 kHz is outside the mask.
    expect(range.max).toBeGreaterThanOrEqual(2.3);
    expect(range.min).toBeLessThanOrEqual(-6);
    expect(range.min).toBeGreaterThan(-10);
    // Zoomed to the failure only the nearby limits count.
    const zoomed = spectrumYRange(columns, p, { min: 4000, max: 12000 }, false);
    expect(zoomed.min).toBeGreaterThanOrEqual(-2);
    expect(zoomed.max).toBeGreaterThanOrEqual(2.3);
  });

  it('asks for about one column per device pixel, in steps, within what the API allows', () => {
    expect(columnsForWidth(960)).toBe(1024);
    expect(columnsForWidth(1000, 2)).toBe(2048);
    expect(columnsForWidth(3000, 2)).toBe(4096);
    expect(columnsForWidth(100)).toBe(256);
  });

  it('chooses tick decimals from the tick step', () => {
    expect(tickDecimals(10)).toBe(0);
    expect(tickDecimals(0.5)).toBe(1);
    expect(tickDecimals(0.25)).toBe(2);
  });
});

const check = (over: Partial<CheckResultDto> & { id: string }): CheckResultDto => ({
  kind: 'level',
  label: null,
  pass: true,
  measured: 0,
  limit: 0,
  margin: 1,
  unit: 'dB',
  worstHz: null,
  ...over,
});

describe('checks table order and numbers', () => {
  const checks = [
    check({ id: 'a-pass', margin: 0.5 }),
    check({ id: 'b-fail-small', pass: false, margin: -0.2 }),
    check({ id: 'c-pass-null', margin: null }),
    check({ id: 'd-fail-big', pass: false, margin: -1.3, kind: 'magnitude-envelope', worstHz: 8020 }),
  ];

  it('puts failing checks first, the worst margin first, then the passing ones in mask order', () => {
    expect(sortChecks(checks).map((c) => c.id)).toEqual(['d-fail-big', 'b-fail-small', 'a-pass', 'c-pass-null']);
  });

  it('sorts by margin either way with blanks last', () => {
    expect(sortChecks(checks, { key: 'margin', direction: 'desc' }).map((c) => c.id)).toEqual(['a-pass', 'b-fail-small', 'd-fail-big', 'c-pass-null']);
    expect(sortChecks(checks, { key: 'margin', direction: 'asc' }).map((c) => c.id)).toEqual(['d-fail-big', 'b-fail-small', 'a-pass', 'c-pass-null']);
  });

  it('signs margins, keeps units and writes tiny ratios as powers of ten', () => {
    expect(formatMargin(-1.3, 'dB')).toBe(`${MINUS}1.30 dB`);
    expect(formatMargin(0.88, 'dBFS')).toBe('+0.88 dB');
    expect(formatMargin(-3, 'count')).toBe(`${MINUS}3`);
    expect(formatValue(2.1e-14, 'ratio')).toBe('2.10×10⁻¹⁴');
    expect(formatValue(5.2, 'deg')).toBe('5.2°');
    expect(formatValue(null, 'dB')).toBe('—');
    expect(worstPointLabel({ hz: 8020, margin: -1.3 }, 'dB')).toBe(`${MINUS}1.30 dB margin at 8.02 kHz`);
  });
});

describe('listening level', () => {
  it('starts low and clamps the slider to the cap', () => {
    expect(PLAYBACK_LEVEL.initialDb).toBeLessThanOrEqual(-30);
    expect(clampPlaybackLevelDb(0)).toBe(PLAYBACK_LEVEL.maxDb);
    expect(clampPlaybackLevelDb(-200)).toBe(PLAYBACK_LEVEL.minDb);
    expect(clampPlaybackLevelDb(Number.NaN)).toBe(PLAYBACK_LEVEL.initialDb);
  });

  it('never lets the output peak exceed the cap, even for captures past full scale', () => {
    const cap = dbToGain(PLAYBACK_LEVEL.maxDb);
    for (const level of [-60, -30, -6, 0, 12]) {
      for (const peak of [0.1, 1, 4, 30]) {
        expect(playbackGain(level, peak) * Math.max(peak, 1)).toBeLessThanOrEqual(cap + 1e-12);
      }
    }
    // Within full scale the gain is just the level.
    expect(gainToDb(playbackGain(-30, 0.5))).toBeCloseTo(-30, 10);
    // A capture peaking at 4 (+12 dBFS) at the cap plays with its peak at the cap.
    expect(gainToDb(playbackGain(-6, 4) * 4)).toBeCloseTo(-6, 10);
  });

  it('finds the peak over all channels', () => {
    expect(peakOf([new Float32Array([0.1, -0.7]), new Float32Array([0.5, 0.2])])).toBeCloseTo(0.7, 6);
  });
});
