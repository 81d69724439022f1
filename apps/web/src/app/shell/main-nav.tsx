import type { ReactNode } from 'react';
import { NavLink, useMatch } from 'react-router';
import { useOverview } from '@/features/projects/api/get-overview';
import { useProjectAbilities } from '@/lib/authorization';
import { cn } from '@/lib/cn';
import { paths } from '@/lib/paths';

/** `count`: a number that needs attention (open findings on main, decisions awaiting the viewer); `countLabel` says what it counts. */
type NavItem = { label: string; to: string; icon: ReactNode; end?: boolean; count?: number; countLabel?: string };

type NavCounts = { openFindingsOnMain?: number; awaitingYou?: number };

// Only areas that exist are listed; masks, approvals, test cases and admin join these
// lists (and their sections) as their pages land.
const workspaceItems: NavItem[] = [
  {
    label: 'Projects',
    to: paths.projects(),
    end: true,
    icon: (
      <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
        <path d="M2.5 4.5h4l1.2 1.5h5.8v6.5h-11Z" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinejoin="round" />
      </svg>
    ),
  },
];

function projectItems(projectKey: string, canAdminister: boolean, canApprove = false, counts: NavCounts = {}): NavItem[] {
  const items: NavItem[] = [
    {
      label: 'Overview',
      to: paths.project(projectKey),
      end: true,
      icon: (
        <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
          <rect x="2.5" y="2.5" width="4.5" height="4.5" rx="1" fill="none" stroke="currentColor" strokeWidth="1.4" />
          <rect x="9" y="2.5" width="4.5" height="4.5" rx="1" fill="none" stroke="currentColor" strokeWidth="1.4" />
          <rect x="2.5" y="9" width="11" height="4.5" rx="1" fill="none" stroke="currentColor" strokeWidth="1.4" />
        </svg>
      ),
    },
    {
      label: 'Builds',
      to: paths.builds(projectKey),
      icon: (
        <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
          <path d="M2.5 4h11M2.5 8h11M2.5 12h11" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" />
          <circle cx="5" cy="8" r="1.6" fill="currentColor" />
        </svg>
      ),
    },
    {
      label: 'Findings',
      to: paths.findings(projectKey),
      count: counts.openFindingsOnMain,
      countLabel: 'open on main',
      icon: (
        <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
          <path d="M4 13.5V2.5h7.5l-1.8 3 1.8 3H4" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinejoin="round" />
        </svg>
      ),
    },
    {
      label: 'Test cases',
      to: paths.testCases(projectKey),
      icon: (
        <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
          <path d="M1.5 8h2l1.5-4 2.5 8 2-6 1.5 2h3.5" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" strokeLinejoin="round" />
        </svg>
      ),
    },
  ];
  if (canApprove) {
    items.push(
      {
        label: 'Approvals',
        to: paths.approvals(projectKey),
        count: counts.awaitingYou,
        countLabel: 'awaiting your decision',
        icon: (
          <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
            <path d="M8 1.8 13.5 4v3.8c0 3-2.4 5.3-5.5 6.4-3.1-1.1-5.5-3.4-5.5-6.4V4Z" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinejoin="round" />
            <path d="m5.6 8 1.7 1.6 3.1-3.3" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" strokeLinejoin="round" />
          </svg>
        ),
      },
      {
        label: 'Audit log',
        to: paths.audit(projectKey),
        icon: (
          <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
            <rect x="3" y="2" width="10" height="12" rx="1.5" fill="none" stroke="currentColor" strokeWidth="1.4" />
            <path d="M5.5 5.5h5M5.5 8h5M5.5 10.5h3" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" />
          </svg>
        ),
      },
    );
  }
  if (canAdminister) {
    items.push({
      label: 'Members',
      to: paths.members(projectKey),
      icon: (
        <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
          <circle cx="6" cy="5.5" r="2.3" fill="none" stroke="currentColor" strokeWidth="1.4" />
          <path d="M1.8 13c.6-2.2 2.2-3.4 4.2-3.4s3.6 1.2 4.2 3.4M10.5 3.4a2.3 2.3 0 0 1 0 4.3M12 9.8c1.1.5 1.9 1.6 2.2 3.2" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" />
        </svg>
      ),
    });
    items.push({
      label: 'API tokens',
      to: paths.tokens(projectKey),
      icon: (
        <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
          <circle cx="5.5" cy="8" r="3" fill="none" stroke="currentColor" strokeWidth="1.4" />
          <path d="M8.5 8h5M11.5 8v2.5M13.5 8v2" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" />
        </svg>
      ),
    });
  }
  return items;
}

function NavList({ items }: { items: NavItem[] }) {
  return (
    <ul className="space-y-0.5">
      {items.map((item) => (
        <li key={item.to} className="shrink-0">
          <NavLink
            to={item.to}
            end={item.end}
            className={({ isActive }) =>
              cn(
                'relative flex h-9 items-center gap-2.5 rounded-md px-3 text-sm font-medium whitespace-nowrap transition-colors',
                isActive
                  ? 'bg-white/[0.08] text-paper before:absolute before:inset-y-2 before:-left-3 before:hidden before:w-[3px] before:rounded-r before:bg-brass-400 md:before:block'
                  : 'text-ink-300 hover:bg-white/[0.05] hover:text-paper',
              )
            }
          >
            {item.icon}
            {item.label}
            {item.count ? (
              // Left out of the link's name (it stays "Findings"); the title says what the number counts.
              <span
                aria-hidden="true"
                title={`${item.count} ${item.countLabel ?? ''}`.trim()}
                data-nav-count={item.count}
                className="ml-auto rounded-full bg-brass-400/90 px-1.5 font-mono text-[11px] leading-[18px] font-semibold tabular-nums text-ink-950"
              >
                {item.count}
              </span>
            ) : null}
          </NavLink>
        </li>
      ))}
    </ul>
  );
}

function SectionLabel({ children }: { children: ReactNode }) {
  return (
    <p className="mb-2 truncate px-3 text-[11px] font-semibold uppercase tracking-[0.09em] text-ink-500">{children}</p>
  );
}

export function MainNav() {
  // Inside a project (its overview or any page under it) the project's own areas are listed too.
  const match = useMatch('/projects/:projectKey/*');
  const projectKey = match?.params.projectKey;
  const { canAdminister, canApprove } = useProjectAbilities(projectKey ?? '');
  // The counts come with the project's overview (cached; a failed load just shows no numbers).
  const overview = useOverview(projectKey ?? '', Boolean(projectKey));

  return (
    // One vertical list at every width: the rail from 768 px, the menu drawer below it (shell/nav-drawer.tsx).
    <nav aria-label="Main" className="min-w-0">
      <SectionLabel>Workspace</SectionLabel>
      <NavList items={workspaceItems} />
      {projectKey ? (
        <div className="mt-5 md:mt-6">
          <SectionLabel>
            Project · <span className="font-mono normal-case tracking-normal text-ink-400">{projectKey}</span>
          </SectionLabel>
          <NavList items={projectItems(projectKey, canAdminister, canApprove, overview.data?.counts)} />
        </div>
      ) : null}
    </nav>
  );
}
