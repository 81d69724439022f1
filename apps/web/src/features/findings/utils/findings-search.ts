import { FindingState, FindingsQuery } from '@earmark/contracts';
import { z } from 'zod';

/**
 * The queue's state in the URL. `state` is the one twist: with no `state` in the URL the
 * queue shows what needs a human (`active` = open + investigating); `all` lifts the filter.
 */
export const FindingsStateFilter = z.union([FindingState, z.literal('active'), z.literal('all')]);
export type FindingsStateFilter = z.infer<typeof FindingsStateFilter>;

export type FindingsSearch = {
  page: number;
  pageSize: number;
  state: FindingsStateFilter;
  assignee?: string;
  testCase?: string;
  target?: string;
};

export const defaultFindingsSearch: FindingsSearch = { page: 1, pageSize: 50, state: 'active' };

const Search = z.object({
  page: FindingsQuery.shape.page,
  pageSize: FindingsQuery.shape.pageSize,
  state: FindingsStateFilter.default('active'),
  assignee: FindingsQuery.shape.assignee,
  testCase: FindingsQuery.shape.testCase,
  target: FindingsQuery.shape.target,
});

const keys = ['page', 'pageSize', 'state', 'assignee', 'testCase', 'target'] as const;
type Key = (typeof keys)[number];

export function parseFindingsSearch(params: URLSearchParams): FindingsSearch {
  const raw: Partial<Record<Key, string>> = {};
  for (const key of keys) {
    const value = params.get(key)?.trim();
    if (value) raw[key] = value;
  }
  let parsed = Search.safeParse(raw);
  if (!parsed.success) {
    // Drop what the API would refuse (a hand-edited URL) instead of failing the page.
    for (const issue of parsed.error.issues) {
      const key = issue.path[0];
      if (typeof key === 'string' && key in raw) delete raw[key as Key];
    }
    parsed = Search.safeParse(raw);
  }
  return parsed.success ? parsed.data : defaultFindingsSearch;
}

/** For the URL: defaults left out. */
export function findingsUrlParams(search: FindingsSearch): URLSearchParams {
  const params = new URLSearchParams();
  for (const key of keys) {
    const value = search[key];
    if (value === undefined || value === defaultFindingsSearch[key]) continue;
    params.set(key, String(value));
  }
  return params;
}

/** For the API: `all` means no state filter; everything else is sent as is. */
export function findingsApiParams(search: FindingsSearch & { captureId?: string }): URLSearchParams {
  const params = new URLSearchParams({ page: String(search.page), pageSize: String(search.pageSize) });
  if (search.state !== 'all') params.set('state', search.state);
  if (search.assignee) params.set('assignee', search.assignee);
  if (search.testCase) params.set('testCase', search.testCase);
  if (search.target) params.set('target', search.target);
  if (search.captureId) params.set('captureId', search.captureId);
  return params;
}
