import type { FindingState } from '@earmark/contracts';

export const findingStateLabels: Record<FindingState, string> = {
  open: 'Open',
  investigating: 'Investigating',
  accepted_deviation: 'Accepted deviation',
  fixed: 'Fixed',
  not_a_defect: 'Not a defect',
};

export const findingStateHints: Record<FindingState, string> = {
  open: 'Nobody has looked yet',
  investigating: 'Someone is on it',
  accepted_deviation: 'Known and tolerated (a waiver)',
  fixed: 'Resolved by a later commit',
  not_a_defect: 'The check or mask was wrong',
};

export const findingStates = Object.keys(findingStateLabels) as FindingState[];
