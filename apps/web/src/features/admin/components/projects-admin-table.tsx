import type { Project } from '@earmark/contracts';
import { useState } from 'react';
import { Link } from 'react-router';
import { ActionConfirmDialog } from '@/components/action-confirm-dialog';
import { Button } from '@/components/button';
import { RelativeTime } from '@/components/relative-time';
import { notify } from '@/components/toast';
import { paths } from '@/lib/paths';
import { useSetProjectArchived } from '../api/admin-projects';
import { errorDetail } from '../utils/error-text';
import { StatusBadge } from './status-badge';

/** Every project, archived ones marked, with its members and the archive switch. */
export function ProjectsAdminTable({ projects }: { projects: Project[] }) {
  const [archiving, setArchiving] = useState<Project | null>(null);
  const setArchived = useSetProjectArchived();
  const close = () => {
    setArchived.reset();
    setArchiving(null);
  };
  const archive = () => {
    if (!archiving) return;
    const project = archiving;
    setArchived.mutate(
      { key: project.key, archived: true },
      {
        onSuccess: () => {
          notify.success(`${project.name} is archived`, 'It left the project lists and refuses uploads; its history stays readable here.');
          close();
        },
      },
    );
  };
  const restore = (project: Project) =>
    setArchived.mutate(
      { key: project.key, archived: false },
      {
        onSuccess: () => notify.success(`${project.name} is restored`, 'Members see it again and CI may upload.'),
        onError: (error) => notify.error(`${project.name} was not restored`, errorDetail(error)),
      },
    );

  return (
    <>
      <div className="overflow-x-auto rounded-lg border border-line bg-paper-raised">
        <table aria-label="Projects" className="w-full min-w-[720px] border-collapse text-sm">
          <thead>
            <tr className="border-b border-line text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
              <th scope="col" className="h-10 px-4">Project</th>
              <th scope="col" className="px-4">Status</th>
              <th scope="col" className="px-4 text-right">Builds</th>
              <th scope="col" className="px-4">Created</th>
              <th scope="col" className="px-4 text-right">Actions</th>
            </tr>
          </thead>
          <tbody>
            {projects.map((project) => (
              <tr key={project.key} className="border-b border-line align-middle last:border-b-0">
                <td className="px-4 py-2.5">
                  <Link to={paths.project(project.key)} className="block font-medium text-ink-950 hover:underline">
                    {project.name}
                  </Link>
                  <span className="block font-mono text-[12.5px] text-ink-600">{project.key}</span>
                </td>
                <td className="px-4 py-2.5">
                  <StatusBadge status={project.archivedAt ? 'archived' : 'active'} />
                </td>
                <td className="px-4 py-2.5 text-right tabular-nums text-ink-800">{project.buildCount}</td>
                <td className="px-4 py-2.5 text-ink-600">
                  <RelativeTime iso={project.createdAt} />
                </td>
                <td className="px-4 py-2.5">
                  <div className="flex justify-end gap-2">
                    <Link
                      to={paths.members(project.key)}
                      className="inline-flex h-8 items-center rounded-md border border-line-strong bg-paper-raised px-2.5 text-[13px] font-medium text-ink-900 hover:border-ink-400"
                    >
                      Members
                    </Link>
                    {project.archivedAt ? (
                      <Button variant="secondary" className="h-8 px-2.5 text-[13px]" busy={setArchived.isPending && setArchived.variables?.key === project.key} onClick={() => restore(project)}>
                        Restore
                      </Button>
                    ) : (
                      <Button variant="secondary" className="h-8 px-2.5 text-[13px]" onClick={() => setArchiving(project)}>
                        Archive
                      </Button>
                    )}
                  </div>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <ActionConfirmDialog
        open={archiving !== null}
        title={`Archive ${archiving?.name ?? ''}?`}
        confirmLabel="Archive"
        busy={setArchived.isPending}
        error={setArchived.error}
        onConfirm={archive}
        onClose={close}
      >
        <p>
          <span className="font-mono">{archiving?.key}</span> leaves everyone&apos;s project list, and its CI uploads are refused with a message that
          says it is archived. Builds, verdicts and masks stay; administrators can read them and restore the project at any time.
        </p>
      </ActionConfirmDialog>
    </>
  );
}
