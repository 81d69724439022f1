import { WorkspaceAuditQuery } from '@earmark/contracts';

/** The workspace audit log's filters and page, kept in the URL so a filtered view can be shared. */
export type WorkspaceAuditSearch = { actor?: string; action?: string; project?: string; from?: string; to?: string; page: number; pageSize: number };

const filterKeys = ['actor', 'action', 'project', 'from', 'to'] as const;
const defaults = { page: 1, pageSize: 50 };

export function parseWorkspaceAuditSearch(params: URLSearchParams): WorkspaceAuditSearch {
  const raw: Record<string, string> = {};
  for (const key of [...filterKeys, 'page', 'pageSize'] as const) {
    const value = params.get(key)?.trim();
    if (value) raw[key] = value;
  }
  let parsed = WorkspaceAuditQuery.safeParse(raw);
  if (!parsed.success) {
    // A hand-edited URL: drop what the API would refuse rather than fail the page.
    for (const issue of parsed.error.issues) delete raw[String(issue.path[0])];
    parsed = WorkspaceAuditQuery.safeParse(raw);
  }
  return parsed.success ? parsed.data : { ...defaults };
}

export function workspaceAuditParams(search: WorkspaceAuditSearch, forApi = false): URLSearchParams {
  const params = new URLSearchParams();
  for (const key of filterKeys) if (search[key]) params.set(key, search[key]);
  if (forApi || search.page !== defaults.page) params.set('page', String(search.page));
  if (forApi || search.pageSize !== defaults.pageSize) params.set('pageSize', String(search.pageSize));
  return params;
}

export const hasWorkspaceAuditFilter = (search: WorkspaceAuditSearch) => filterKeys.some((key) => Boolean(search[key]));
