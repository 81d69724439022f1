/** Numbers a person compares: one decimal, a real minus sign, an explicit plus for positives. */
export function formatSigned(value: number, digits = 1): string {
  const rounded = value.toFixed(digits);
  // -0.0 reads as a failure that is not one; show it as 0.
  if (Number(rounded) === 0) return (0).toFixed(digits);
  return value > 0 ? `+${rounded}` : `\u2212${rounded.slice(1)}`;
}

/** 125 Hz, 1.0 kHz, 12.5 kHz: the resolution an engineer reads a band at. */
export function formatHz(hz: number): string {
  if (hz >= 1000) return `${(hz / 1000).toFixed(1)} kHz`;
  return `${hz >= 100 ? Math.round(hz) : Number(hz.toFixed(1))} Hz`;
}

export type CheckOutcomeLike = {
  kind: string;
  label: string | null;
  margin: number | null;
  unit: string | null;
  worstHz: number | null;
};

/** The name of a check: its mask label, else its kind in words (`band_levels` → "band levels"). */
export function checkName(check: Pick<CheckOutcomeLike, 'kind' | 'label'>): string {
  return check.label ?? check.kind.replace(/[_-]+/g, ' ');
}

/** "response −1.3 dB @ 8.0 kHz": a failing check's margin and where it is worst. */
export function describeMargin(check: Omit<CheckOutcomeLike, 'kind' | 'label'>): string {
  if (check.margin === null) return 'no margin';
  const value = `${formatSigned(check.margin)}${check.unit ? ` ${check.unit}` : ''}`;
  return check.worstHz === null ? value : `${value} @ ${formatHz(check.worstHz)}`;
}

export function describeCheck(check: CheckOutcomeLike): string {
  return `${checkName(check)} ${describeMargin(check)}`;
}
