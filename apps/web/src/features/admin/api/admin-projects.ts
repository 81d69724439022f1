import { Project, type CreateProjectRequest } from '@earmark/contracts';
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';

const ProjectList = z.object({ items: z.array(Project) });

/** Every project, archived ones included (the admin area); the shared projects list leaves them out. */
export function getAllProjectsQueryOptions() {
  return queryOptions({
    queryKey: ['admin', 'projects'] as const,
    queryFn: async ({ signal }) => (await apiRequest('/api/projects?archived=include', { schema: ProjectList, signal })).items,
  });
}

export function useAllProjects() {
  return useQuery(getAllProjectsQueryOptions());
}

/** After any change both the admin list and everyone's projects list are stale. */
function useInvalidateProjects() {
  const queryClient = useQueryClient();
  return () => Promise.all([queryClient.invalidateQueries({ queryKey: ['admin', 'projects'] }), queryClient.invalidateQueries({ queryKey: ['projects'] })]);
}

export function useCreateProject() {
  const invalidate = useInvalidateProjects();
  return useMutation({
    mutationFn: (body: CreateProjectRequest) => apiRequest('/api/projects', { method: 'POST', body, schema: Project }),
    onSuccess: invalidate,
  });
}

export function useSetProjectArchived() {
  const invalidate = useInvalidateProjects();
  return useMutation({
    mutationFn: ({ key, archived }: { key: string; archived: boolean }) =>
      apiRequest(`/api/projects/${encodeURIComponent(key)}`, { method: 'PATCH', body: { archived }, schema: Project }),
    onSuccess: invalidate,
  });
}
