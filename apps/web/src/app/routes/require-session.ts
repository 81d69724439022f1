import { redirect, type LoaderFunctionArgs } from 'react-router';
import { ApiError } from '@/lib/api-error';
import { paths } from '@/lib/paths';
import { sessionStore } from '@/lib/session-store';

function returnPath(request: Request): string {
  const url = new URL(request.url);
  return `${url.pathname}${url.search}`;
}

/**
 * Wraps a loader of a signed-in page: without a session it sends the visitor to sign-in
 * (remembering where they were going), and a session the API refuses even after a
 * refresh does the same instead of showing an error page.
 */
export function requireSession<T>(loader: (args: LoaderFunctionArgs) => Promise<T>) {
  return async (args: LoaderFunctionArgs): Promise<T> => {
    if (!sessionStore.getTokens()) throw redirect(paths.signIn(returnPath(args.request)));
    try {
      return await loader(args);
    } catch (error) {
      if (error instanceof ApiError && error.isUnauthorized) {
        throw redirect(paths.signIn(returnPath(args.request), true));
      }
      throw error;
    }
  };
}
