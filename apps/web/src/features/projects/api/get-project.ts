import { Project } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';

export function getProject(key: string, signal?: AbortSignal): Promise<Project> {
  return apiRequest(`/api/projects/${encodeURIComponent(key)}`, { schema: Project, signal });
}

export function getProjectQueryOptions(key: string) {
  return queryOptions({
    // Under ['projects'] so invalidating the list also refreshes each project.
    queryKey: ['projects', key],
    queryFn: ({ signal }) => getProject(key, signal),
  });
}

export function useProject(key: string) {
  return useQuery(getProjectQueryOptions(key));
}
