import { useState } from 'react';
import { RouterProvider } from 'react-router/dom';
import { AppProvider } from './provider';
import { createQueryClient } from './query-client';
import { createAppRouter } from './router';

export function App() {
  // Created once per page load; loaders and components must share the same cache.
  const [queryClient] = useState(createQueryClient);
  const [router] = useState(() => createAppRouter(queryClient));
  return (
    <AppProvider queryClient={queryClient}>
      <RouterProvider router={router} />
    </AppProvider>
  );
}
