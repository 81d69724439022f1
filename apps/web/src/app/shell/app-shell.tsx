import { useQueryClient } from '@tanstack/react-query';
import { useEffect } from 'react';
import { Link, Outlet, useLocation, useNavigate, useNavigation } from 'react-router';
import { FullPageLoading } from '@/components/full-page-status';
import { Wordmark } from '@/components/logo';
import { useMe } from '@/features/auth/api/get-me';
import { paths } from '@/lib/paths';
import { useSession } from '@/lib/use-session';
import { MainNav } from './main-nav';
import { NavDrawer } from './nav-drawer';
import { UserMenu } from './user-menu';

function NavigationProgress() {
  const navigation = useNavigation();
  if (navigation.state === 'idle') return null;
  return (
    <div role="progressbar" aria-label="Loading page" className="fixed inset-x-0 top-0 z-50 h-0.5 overflow-hidden bg-brass-100">
      <div className="h-full w-1/3 animate-[earmark-progress_1.1s_ease-in-out_infinite] bg-brass-500" />
    </div>
  );
}

/**
 * Sends the user to sign-in whenever the session ends while a signed-in page is open:
 * sign-out here or in another tab, or a refresh the API refused.
 */
function useLeaveWhenSignedOut() {
  const { tokens, endReason } = useSession();
  const navigate = useNavigate();
  const location = useLocation();
  const queryClient = useQueryClient();

  useEffect(() => {
    if (tokens) return;
    const target =
      endReason === 'expired' ? paths.signIn(`${location.pathname}${location.search}`, true) : paths.signIn();
    // Drop cached data only after leaving, so mounted queries do not refetch without a token.
    void Promise.resolve(navigate(target, { replace: true })).then(() => queryClient.clear());
    // location is left out on purpose: it is read only at the moment the session ends.
  }, [tokens, endReason, navigate, queryClient]);
}

export function AppShell() {
  useLeaveWhenSignedOut();
  const me = useMe();

  // The route loader has already fetched /api/me, so this only shows if the cache was cleared.
  if (!me.data) return <FullPageLoading />;

  return (
    <div className="min-h-dvh bg-paper md:grid md:grid-cols-[248px_minmax(0,1fr)]">
      <NavigationProgress />
      <aside className="sticky top-0 z-20 flex items-center gap-4 bg-ink-950 px-4 py-2.5 md:h-dvh md:flex-col md:items-stretch md:gap-0 md:px-3 md:py-0">
        <Link
          to={paths.projects()}
          className="shrink-0 rounded-md md:flex md:h-16 md:items-center md:px-2"
          aria-label="Earmark home"
        >
          <Wordmark />
        </Link>
        <NavDrawer>
          <MainNav />
        </NavDrawer>
        <div className="md:mt-auto md:border-t md:border-white/[0.07] md:py-3">
          <UserMenu user={me.data} />
        </div>
      </aside>
      <main id="main" className="min-w-0 px-5 py-7 md:px-10 md:py-9">
        <div className="mx-auto max-w-[1180px]">
          <Outlet />
        </div>
      </main>
    </div>
  );
}
