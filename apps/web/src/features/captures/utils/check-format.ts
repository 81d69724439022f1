import { formatFrequency, formatMargin as formatCheckMargin, formatQuantity, type CheckResultDto } from '@earmark/contracts';

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

/** A measured value or limit in its unit ("−20.03 dBFS", "0.042 %", "3"); an em dash when absent. */
export function formatValue(value: number | null, unit: string | null): string {
  return formatQuantity(value, unit);
}

/** A margin, always signed: positive is inside the limit, negative outside ("−1.30 dB"; dB for a dBFS check). */
export function formatMargin(value: number | null, unit: string | null): string {
  return formatCheckMargin(value, unit);
}

/** The spectrum's worst-point label, e.g. "−1.30 dB margin at 8.02 kHz". */
export function worstPointLabel(worst: { hz: number; margin: number }, unit: string): string {
  return `${formatMargin(worst.margin, unit)} margin at ${formatFrequency(worst.hz)}`;
}
