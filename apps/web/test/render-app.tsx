import type { QueryClient } from '@tanstack/react-query';
import { render } from '@testing-library/react';
import { createMemoryRouter, RouterProvider } from 'react-router';
import { AppProvider } from '@/app/provider';
import { createQueryClient } from '@/app/query-client';
import { createAppRoutes } from '@/app/router';
import { sessionStore } from '@/lib/session-store';

/** Mounts the real route table at `path`, as the browser would after a full page load. */
type MemoryRouter = ReturnType<typeof createMemoryRouter>;

export function renderApp(path: string): { router: MemoryRouter; queryClient: QueryClient; unmount: () => void } {
  // Storage may have been seeded by the test; the store reads it once at start-up.
  sessionStore.reload();
  const queryClient = createQueryClient();
  queryClient.setDefaultOptions({ queries: { retry: false, staleTime: 30_000 } });
  const router = createMemoryRouter(createAppRoutes(queryClient), { initialEntries: [path] });
  const view = render(
    <AppProvider queryClient={queryClient}>
      <RouterProvider router={router} />
    </AppProvider>,
  );
  return { router, queryClient, unmount: view.unmount };
}
