import { FindingState, FindingsQuery, MAIN_BRANCH } from '@earmark/contracts';
import { z } from 'zod';

/**
 * The queue's state in the URL. `state` is the one twist: with no `state` in the URL the
 * queue shows what needs a human (`active` = open + investigating); `all` lifts the filter.
 */
export const FindingsStateFilter = z.union([FindingState, z.literal('active'), z.literal('all')]);
export type FindingsStateFilter = z.infer<typeof FindingsStateFilter>;

/** The branch filter's "every branch" (git branch names cannot contain `*`). */
export const ANY_BRANCH = '*';

export type FindingsSearch = {
  page: number;
  pageSize: number;
  state: FindingsStateFilter;
  /** A branch, or ANY_BRANCH; the queue opens on main's findings. Left out (the capture page's list): every branch. */
  branch?: string;
  assignee?: string;
  testCase?: string;
  target?: string;
};

export const defaultFindingsSearch: FindingsSearch = { page: 1, pageSize: 50, state: 'active', branch: MAIN_BRANCH };

const Search = z.object({
  page: FindingsQuery.shape.page,
  pageSize: FindingsQuery.shape.pageSize,
  state: FindingsStateFilter.default('active'),
  branch: z.union([FindingsQuery.shape.branch.unwrap(), z.literal(ANY_BRANCH)]).default(MAIN_BRANCH),
  assignee: FindingsQuery.shape.assignee,
  testCase: FindingsQuery.shape.testCase,
  target: FindingsQuery.shape.target,
});

const keys = ['page', 'pageSize', 'state', 'branch', 'assignee', 'testCase', 'target'] as const;
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
  if (search.branch && search.branch !== ANY_BRANCH) params.set('branch', search.branch);
  if (search.assignee) params.set('assignee', search.assignee);
  if (search.testCase) params.set('testCase', search.testCase);
  if (search.target) params.set('target', search.target);
  if (search.captureId) params.set('captureId', search.captureId);
  return params;
}
