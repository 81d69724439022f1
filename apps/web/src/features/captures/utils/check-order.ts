import type { CheckResultDto } from '@earmark/contracts';
import { checkKindLabel } from './check-format';

export type CheckSortKey = 'status' | 'id' | 'kind' | 'margin' | 'worstHz';
export type CheckSort = { key: CheckSortKey; direction: 'asc' | 'desc' };

/** Failing checks first, the tightest margin first among them; the page opens on this. */
export const defaultCheckSort: CheckSort = { key: 'status', direction: 'asc' };

type Indexed = { check: CheckResultDto; index: number };

/** Absent numbers sort after present ones whichever the direction, so blanks never lead. */
function compareNullable(a: number | null, b: number | null, direction: 1 | -1): number {
  if (a === null && b === null) return 0;
  if (a === null) return 1;
  if (b === null) return -1;
  return (a - b) * direction;
}

function compare(a: Indexed, b: Indexed, sort: CheckSort): number {
  const direction = sort.direction === 'asc' ? 1 : -1;
  switch (sort.key) {
    case 'status': {
      // Ascending = failing first; within a group the smaller margin (the worse one) first.
      const byPass = (Number(a.check.pass) - Number(b.check.pass)) * direction;
      return byPass || compareNullable(a.check.margin, b.check.margin, 1);
    }
    case 'id':
      return a.check.id.localeCompare(b.check.id) * direction;
    case 'kind':
      return checkKindLabel(a.check.kind).localeCompare(checkKindLabel(b.check.kind)) * direction;
    case 'margin':
      return compareNullable(a.check.margin, b.check.margin, direction);
    case 'worstHz':
      return compareNullable(a.check.worstHz, b.check.worstHz, direction);
  }
}

/** Sorted copy of the checks; ties keep the mask's own order. */
export function sortChecks(checks: readonly CheckResultDto[], sort: CheckSort = defaultCheckSort): CheckResultDto[] {
  return checks
    .map((check, index) => ({ check, index }))
    .sort((a, b) => compare(a, b, sort) || a.index - b.index)
    .map(({ check }) => check);
}
