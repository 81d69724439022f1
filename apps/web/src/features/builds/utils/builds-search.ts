import { BUILD_SORTS, BuildsQuery } from '@earmark/contracts';

export type BuildSort = (typeof BUILD_SORTS)[number];

/** The builds table's state as it lives in the URL; defaults are left out of the URL. */
export type BuildsSearch = BuildsQuery;

const keys = ['page', 'pageSize', 'sort', 'sha', 'branch', 'status', 'target', 'from', 'to'] as const;
type Key = (typeof keys)[number];

export const defaultBuildsSearch: BuildsSearch = BuildsQuery.parse({});

/**
 * Reads the table state from URL search params with the API's own schema. A value the
 * API would reject (a hand-edited `?status=green`) is dropped rather than breaking the page.
 */
export function parseBuildsSearch(params: URLSearchParams): BuildsSearch {
  const raw: Partial<Record<Key, string>> = {};
  for (const key of keys) {
    const value = params.get(key)?.trim();
    if (value) raw[key] = key === 'sha' ? value.toLowerCase() : value;
  }
  const parsed = BuildsQuery.safeParse(raw);
  if (parsed.success) return parsed.data;
  for (const issue of parsed.error.issues) {
    const key = issue.path[0];
    if (typeof key === 'string' && key in raw) delete raw[key as Key];
  }
  return BuildsQuery.safeParse(raw).data ?? defaultBuildsSearch;
}

/** Search params for the URL (defaults omitted) or for the API (`complete`: everything). */
export function buildsSearchParams(search: BuildsSearch, complete = false): URLSearchParams {
  const params = new URLSearchParams();
  for (const key of keys) {
    const value = search[key];
    if (value === undefined || value === '') continue;
    if (!complete && value === defaultBuildsSearch[key]) continue;
    params.set(key, String(value));
  }
  return params;
}

/** Any filter narrows the list (paging and sorting do not). */
export function hasBuildFilters(search: BuildsSearch): boolean {
  return Boolean(search.sha || search.branch || search.status || search.target || search.from || search.to);
}

export function sortToState(sort: BuildSort): { id: string; desc: boolean } {
  return sort.startsWith('-') ? { id: sort.slice(1), desc: true } : { id: sort, desc: false };
}

export function stateToSort(id: string, desc: boolean): BuildSort | null {
  const candidate = `${desc ? '-' : ''}${id}`;
  return (BUILD_SORTS as readonly string[]).includes(candidate) ? (candidate as BuildSort) : null;
}
