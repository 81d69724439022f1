import { ProjectAuditQuery } from '@earmark/contracts';

/** The audit log's filters and page, kept in the URL so a filtered view can be shared. */
export type AuditSearch = { actor?: string; action?: string; entity?: string; page: number; pageSize: number };

export const defaultAuditSearch: AuditSearch = { page: 1, pageSize: 50 };

const keys = ['actor', 'action', 'entity', 'page', 'pageSize'] as const;

export function parseAuditSearch(params: URLSearchParams): AuditSearch {
  const raw: Record<string, string> = {};
  for (const key of keys) {
    const value = params.get(key)?.trim();
    if (value) raw[key] = value;
  }
  let parsed = ProjectAuditQuery.safeParse(raw);
  if (!parsed.success) {
    // A hand-edited URL: drop what the API would refuse rather than fail the page.
    for (const issue of parsed.error.issues) delete raw[String(issue.path[0])];
    parsed = ProjectAuditQuery.safeParse(raw);
  }
  return parsed.success ? parsed.data : defaultAuditSearch;
}

/** URL (and API) parameters; defaults left out of the URL. */
export function auditSearchParams(search: AuditSearch, forApi = false): URLSearchParams {
  const params = new URLSearchParams();
  if (search.actor) params.set('actor', search.actor);
  if (search.action) params.set('action', search.action);
  if (search.entity) params.set('entity', search.entity);
  if (forApi || search.page !== defaultAuditSearch.page) params.set('page', String(search.page));
  if (forApi || search.pageSize !== defaultAuditSearch.pageSize) params.set('pageSize', String(search.pageSize));
  return params;
}
