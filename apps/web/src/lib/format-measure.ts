import { formatMarginAt } from '@earmark/contracts';

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

/** "−1.30 dB at 8.02 kHz": a failing check's margin and where it is worst (one rendering everywhere). */
export function describeMargin(check: Omit<CheckOutcomeLike, 'kind' | 'label'>): string {
  if (check.margin === null) return 'no margin';
  return formatMarginAt(check.margin, check.unit, check.worstHz);
}

export function describeCheck(check: CheckOutcomeLike): string {
  return `${checkName(check)} ${describeMargin(check)}`;
}
