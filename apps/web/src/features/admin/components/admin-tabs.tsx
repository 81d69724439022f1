import { NavLink } from 'react-router';
import { cn } from '@/lib/cn';
import { paths } from '@/lib/paths';

const tabs = [
  { label: 'Users', to: paths.adminUsers() },
  { label: 'Projects', to: paths.adminProjects() },
  { label: 'Audit log', to: paths.adminAudit() },
];

/** The admin area's sections; scrolls inside itself on a phone rather than widening the page. */
export function AdminTabs() {
  return (
    <nav aria-label="Administration" className="-mb-px overflow-x-auto border-b border-line">
      <ul className="flex gap-1">
        {tabs.map((tab) => (
          <li key={tab.to} className="shrink-0">
            <NavLink
              to={tab.to}
              className={({ isActive }) =>
                cn(
                  'inline-flex h-10 items-center border-b-2 px-3 text-sm font-medium whitespace-nowrap transition-colors',
                  isActive ? 'border-brass-500 text-ink-950' : 'border-transparent text-ink-600 hover:text-ink-900',
                )
              }
            >
              {tab.label}
            </NavLink>
          </li>
        ))}
      </ul>
    </nav>
  );
}
