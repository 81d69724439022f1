import { Link } from 'react-router';
import { paths } from '@/lib/paths';

/** Page-header eyebrow inside a project: Projects / key [/ section]. */
export function ProjectBreadcrumb({ projectKey, section }: { projectKey: string; section?: { label: string; to: string } }) {
  return (
    <nav aria-label="Breadcrumb">
      <ol className="flex flex-wrap items-center gap-1.5 normal-case tracking-normal">
        <li>
          <Link to={paths.projects()} className="font-semibold uppercase tracking-[0.08em] hover:text-ink-900">
            Projects
          </Link>
        </li>
        <li aria-hidden="true">/</li>
        <li>
          <Link to={paths.project(projectKey)} className="font-mono font-normal text-ink-600 hover:text-ink-900">
            {projectKey}
          </Link>
        </li>
        {section ? (
          <>
            <li aria-hidden="true">/</li>
            <li>
              <Link to={section.to} className="font-semibold uppercase tracking-[0.08em] hover:text-ink-900">
                {section.label}
              </Link>
            </li>
          </>
        ) : null}
      </ol>
    </nav>
  );
}
