import { Project } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';

const ProjectList = z.object({ items: z.array(Project) });

export async function getProjects(signal?: AbortSignal): Promise<Project[]> {
  const { items } = await apiRequest('/api/projects', { schema: ProjectList, signal });
  return items;
}

export function getProjectsQueryOptions() {
  return queryOptions({
    queryKey: ['projects'],
    queryFn: ({ signal }) => getProjects(signal),
  });
}

export function useProjects() {
  return useQuery(getProjectsQueryOptions());
}
