import type { CurrentUser, Role } from '@earmark/contracts';
import { skipToken, useQuery } from '@tanstack/react-query';

/**
 * The signed-in user as the app shell loaded it. The shell's route loader fetches
 * `/api/me` under this key before any page renders (features/auth/api/get-me.ts owns the
 * fetch); this hook only reads that cache entry, so features can check rights without
 * importing the auth feature.
 */
export const CURRENT_USER_QUERY_KEY = ['me'] as const;

export function useCurrentUser(): CurrentUser | undefined {
  return useQuery<CurrentUser>({ queryKey: CURRENT_USER_QUERY_KEY, queryFn: skipToken }).data;
}

/** The user's role in one project: `admin` for global admins, null for non-members. */
export function projectRole(user: CurrentUser | undefined, projectKey: string): Role | null {
  if (!user) return null;
  if (user.isAdmin) return 'admin';
  return user.memberships.find((membership) => membership.projectKey === projectKey)?.role ?? null;
}

export type ProjectAbilities = {
  role: Role | null;
  /** Assign, change state, comment on findings (engineers and above). */
  canTriage: boolean;
  /** Submit captures and have them analysed again (engineers and above). */
  canSubmit: boolean;
  /** API tokens, members (global admins only). */
  canAdminister: boolean;
  /** Draft mask revisions (engineers and above). */
  canDraftMasks: boolean;
  /** Add and change test cases and targets (engineers and above). */
  canConfigure: boolean;
  /** Approve or reject mask revisions and waivers, read the audit log (QA managers and admins). */
  canApprove: boolean;
};

/** Mirrors the API's permission matrix so the UI hides what the API would refuse with 403. */
export function abilitiesIn(user: CurrentUser | undefined, projectKey: string): ProjectAbilities {
  const role = projectRole(user, projectKey);
  return {
    role,
    canTriage: role === 'engineer' || role === 'qa_manager' || role === 'admin',
    canSubmit: role === 'engineer' || role === 'qa_manager' || role === 'admin',
    canAdminister: role === 'admin',
    canDraftMasks: role === 'engineer' || role === 'qa_manager' || role === 'admin',
    canConfigure: role === 'engineer' || role === 'qa_manager' || role === 'admin',
    canApprove: role === 'qa_manager' || role === 'admin',
  };
}

export function useProjectAbilities(projectKey: string): ProjectAbilities {
  return abilitiesIn(useCurrentUser(), projectKey);
}
