import type { TokenScope } from '@earmark/contracts';

export const scopeDescriptions: Record<TokenScope, { label: string; detail: string }> = {
  'submit-captures': { label: 'Submit captures', detail: 'Create builds and upload captures for analysis.' },
  'read-verdicts': { label: 'Read verdicts', detail: 'Poll builds and captures, fetch JUnit XML.' },
};
