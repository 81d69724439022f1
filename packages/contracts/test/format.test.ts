import { describe, expect, it } from 'vitest';
import {
  describeCheckValues,
  formatDecibels,
  formatDegrees,
  formatEventCount,
  formatFrequency,
  formatLevel,
  formatMargin,
  formatMarginAt,
  formatMilliseconds,
  formatNumberIn,
  formatPercent,
  formatQuantity,
  formatSeconds,
  marginUnit,
} from '../src/index.js';

const M = '\u2212';

describe('frequency: 3 significant digits, Hz below 1 kHz, kHz from 1 kHz', () => {
  it('reads measured frequencies at three significant digits, trailing zeros dropped', () => {
    expect([7986.3, 8020.4, 12500, 20000, 125, 31.5, 997.4, 63.0957, 0.5].map(formatFrequency)).toEqual([
      '7.99 kHz', '8.02 kHz', '12.5 kHz', '20 kHz', '125 Hz', '31.5 Hz', '997 Hz', '63.1 Hz', '0.5 Hz',
    ]);
  });

  it('picks the unit after rounding: 999.4 Hz stays in Hz, 999.6 Hz is 1 kHz, never "1000 Hz"', () => {
    expect(formatFrequency(999.4)).toBe('999 Hz');
    expect(formatFrequency(999.6)).toBe('1 kHz');
    expect(formatFrequency(1000)).toBe('1 kHz');
    expect(formatFrequency(1004)).toBe('1 kHz');
    expect(formatFrequency(1005)).toBe('1.01 kHz');
    expect(formatFrequency(99_950)).toBe('100 kHz');
    expect(formatFrequency(192_000)).toBe('192 kHz');
    expect(formatFrequency(1_234_567)).toBe('1230 kHz');
  });

  it('writes 0 Hz as such and absent or non-finite values as an em dash', () => {
    expect(formatFrequency(0)).toBe('0 Hz');
    expect([null, undefined, NaN, Infinity, -Infinity].map(formatFrequency)).toEqual(['—', '—', '—', '—', '—']);
  });
});

describe('decibels and levels: 2 decimals, a real minus sign', () => {
  it('writes dB and dBFS with two decimals and U+2212 for negatives', () => {
    expect(formatDecibels(-0.831909)).toBe(`${M}0.83 dB`);
    expect(formatDecibels(12)).toBe('12.00 dB');
    expect(formatLevel(-20)).toBe(`${M}20.00 dBFS`);
    expect(formatLevel(-3.0104)).toBe(`${M}3.01 dBFS`);
  });

  it('rounds half away from zero on the decimal value: 9.995 is 10.00, not toFixed\'s 9.99', () => {
    expect((9.995).toFixed(2)).toBe('9.99');
    expect(formatDecibels(9.995)).toBe('10.00 dB');
    expect(formatDecibels(-9.995)).toBe(`${M}10.00 dB`);
    expect(formatDecibels(1.005)).toBe('1.01 dB');
    expect(formatDecibels(9.994)).toBe('9.99 dB');
  });

  it('never shows a sign on zero: 0, −0 and −0.004 are all 0.00', () => {
    expect([0, -0, -0.004, 0.004].map(formatDecibels)).toEqual(['0.00 dB', '0.00 dB', '0.00 dB', '0.00 dB']);
    expect(formatMargin(-0.004, 'dB')).toBe('0.00 dB');
    expect(formatMargin(-0, 'dB')).toBe('0.00 dB');
  });

  it('writes NaN and ±Infinity as an em dash', () => {
    expect([NaN, Infinity, -Infinity].map(formatLevel)).toEqual(['—', '—', '—']);
    expect(formatMargin(NaN, 'dB')).toBe('—');
  });
});

describe('margins: signed, in the check\'s unit, a dBFS check\'s margin in dB', () => {
  it('signs margins: + inside, − outside', () => {
    expect(formatMargin(-0.831909, 'dB')).toBe(`${M}0.83 dB`);
    expect(formatMargin(1.2, 'dB')).toBe('+1.20 dB');
  });

  it('writes a margin between two dBFS levels in dB, while the levels stay in dBFS', () => {
    expect(marginUnit('dBFS')).toBe('dB');
    expect(formatMargin(-17.1, 'dBFS')).toBe(`${M}17.10 dB`);
    expect(formatQuantity(-33.1, 'dBFS')).toBe(`${M}33.10 dBFS`);
  });

  it('rounds counts to whole numbers the same way in a value and a margin: 79153, never 79150 or 79153.0', () => {
    expect(formatQuantity(79153, 'count')).toBe('79153');
    expect(formatMargin(-79153, 'count')).toBe(`${M}79153`);
    expect(formatEventCount(2.5)).toBe('3');
  });

  it('puts the failure location after the margin with "at"', () => {
    expect(formatMarginAt(-0.831909, 'dB', 7986.3)).toBe(`${M}0.83 dB at 7.99 kHz`);
    expect(formatMarginAt(-0.5, 'ms', null)).toBe(`${M}0.500 ms`);
  });
});

describe('other units', () => {
  it('percent: 3 significant digits with a space', () => {
    expect([0.0421, 12.54, 100, 0.000123, 1.23e-7].map(formatPercent)).toEqual(['0.0421 %', '12.5 %', '100 %', '0.000123 %', '0.000000123 %']);
    expect(formatMargin(-0.42, '%')).toBe(`${M}0.42 %`);
  });

  it('durations: ms with 3 decimals, seconds with 2', () => {
    expect(formatMilliseconds(1.25)).toBe('1.250 ms');
    expect(formatMilliseconds(-0.0208)).toBe(`${M}0.021 ms`);
    expect(formatSeconds(0.25)).toBe('0.25 s');
    expect(formatSeconds(5)).toBe('5.00 s');
  });

  it('degrees: 1 decimal, no space', () => {
    expect(formatDegrees(12.34)).toBe('12.3°');
    expect(formatMargin(-3.05, 'deg')).toBe(`${M}3.1°`);
  });

  it('ratios and full scale: 3 significant digits, powers of ten far from 1, no "ratio" word', () => {
    expect(formatQuantity(0.951, 'ratio')).toBe('0.951');
    expect(formatQuantity(2.1e-14, 'ratio')).toBe('2.10×10⁻¹⁴');
    expect(formatQuantity(0.012, 'FS')).toBe('0.012 FS');
    expect(formatQuantity(-0.00012, 'FS')).toBe(`${M}1.20×10⁻⁴ FS`);
    expect(formatMargin(3e6, 'ratio')).toBe('+3.00×10⁶');
  });

  it('any other unit: 3 significant digits with the unit', () => {
    expect(formatQuantity(-20.54, 'LUFS')).toBe(`${M}20.5 LUFS`);
    expect(formatQuantity(312, null)).toBe('312');
    expect(formatNumberIn(-1.3, 'dB', true)).toBe(`${M}1.30`);
  });
});

describe('a check in one phrase', () => {
  it('names measured value, limit and margin with its location, leaving out what is absent', () => {
    const check = { measured: 2.0412, limit: 1, margin: -1.0412, unit: 'dB', worstHz: 8021.7 };
    expect(describeCheckValues(check)).toBe(`measured 2.04 dB, limit 1.00 dB, margin ${M}1.04 dB at 8.02 kHz`);
    expect(describeCheckValues({ ...check, measured: null, margin: null })).toBe('limit 1.00 dB, worst at 8.02 kHz');
    expect(describeCheckValues({ measured: -33.1, limit: -16, margin: -17.1, unit: 'dBFS', worstHz: null })).toBe(`measured ${M}33.10 dBFS, limit ${M}16.00 dBFS, margin ${M}17.10 dB`);
    expect(describeCheckValues({ measured: null, limit: null, margin: null, unit: null, worstHz: null })).toBe('no values');
  });
});
