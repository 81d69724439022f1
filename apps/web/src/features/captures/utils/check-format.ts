import type { CheckResultDto } from '@earmark/contracts';
import { formatHz, plain, signed } from '@/lib/plot/log-frequency';

/** Earmark's names for the check kinds (docs/masks.md). */
export const checkKindLabels: Record<string, string> = {
  'magnitude-envelope': 'Magnitude envelope',
  'band-levels': 'Band levels',
  level: 'Level',
  'phase-linearity': 'Phase linearity',
  distortion: 'Distortion and noise',
  timing: 'Timing',
  integrity: 'Integrity',
};

export function checkKindLabel(kind: string): string {
  return checkKindLabels[kind] ?? kind;
}

/** Checks whose worst frequency is a point on the spectrum plot. */
export function isSpectralCheck(check: Pick<CheckResultDto, 'kind'>): boolean {
  return check.kind === 'magnitude-envelope' || check.kind === 'band-levels';
}

function decimalsFor(unit: string | null): number {
  switch (unit) {
    case 'dB':
    case 'dBFS':
      return 2;
    case 'deg':
      return 1;
    case 'ms':
      return 3;
    case 'count':
      return 0;
    default:
      return 3;
  }
}

function suffix(unit: string | null): string {
  if (unit === null || unit === 'count') return '';
  if (unit === 'deg') return '°';
  if (unit === '%') return ' %';
  return ` ${unit}`;
}

/** Very small or very large values (Parseval ratios, DC in FS) read better in exponent form. */
function needsExponent(value: number, unit: string | null): boolean {
  if (value === 0) return false;
  const magnitude = Math.abs(value);
  return unit === 'ratio' || unit === 'FS' ? magnitude < 1e-3 || magnitude >= 1e6 : magnitude < 1e-4 || magnitude >= 1e9;
}

function exponent(value: number, sign: boolean): string {
  const [mantissa = '0', power = '0'] = Math.abs(value).toExponential(2).split('e');
  const text = `${mantissa}×10${superscript(Number(power))}`;
  if (value < 0) return `\u2212${text}`;
  return sign ? `+${text}` : text;
}

function superscript(power: number): string {
  const digits = '⁰¹²³⁴⁵⁶⁷⁸⁹';
  const body = String(Math.abs(power))
    .split('')
    .map((d) => digits[Number(d)] ?? d)
    .join('');
  return power < 0 ? `⁻${body}` : body;
}

/** A measured value or limit in its unit ("−20.03 dBFS", "0.042 %", "3"); an em dash when absent. */
export function formatValue(value: number | null, unit: string | null): string {
  if (value === null) return '—';
  const number = needsExponent(value, unit) ? exponent(value, false) : plain(value, decimalsFor(unit));
  return `${number}${suffix(unit)}`;
}

/** A margin, always signed: positive is inside the limit, negative outside ("−1.30 dB"). */
export function formatMargin(value: number | null, unit: string | null): string {
  if (value === null) return '—';
  const number = needsExponent(value, unit) ? exponent(value, true) : signed(value, decimalsFor(unit));
  return `${number}${suffix(unit)}`;
}

/** The spectrum's worst-point label, e.g. "−1.30 dB margin @ 8.02 kHz". */
export function worstPointLabel(worst: { hz: number; margin: number }, unit: string): string {
  return `${formatMargin(worst.margin, unit)} margin @ ${formatHz(worst.hz)}`;
}
