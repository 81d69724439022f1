import type { Project } from '@earmark/contracts';
import { useId, useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { FieldLabel, Select, TextInput } from '@/components/form-controls';
import type { WorkspaceAuditSearch } from '../utils/workspace-audit-search';

export type WorkspaceAuditFilterPatch = Partial<Pick<WorkspaceAuditSearch, 'actor' | 'action' | 'project' | 'from' | 'to'>>;

/** Actor and action apply on submit (typed), project and dates at once (picked). */
export function WorkspaceAuditFilters({ search, projects, onChange }: { search: WorkspaceAuditSearch; projects: Project[]; onChange: (patch: WorkspaceAuditFilterPatch) => void }) {
  const ids = { actor: useId(), action: useId(), project: useId(), from: useId(), to: useId() };
  const [actor, setActor] = useState(search.actor ?? '');
  const [action, setAction] = useState(search.action ?? '');
  const submit = (event: FormEvent) => {
    event.preventDefault();
    onChange({ actor: actor.trim() || undefined, action: action.trim() || undefined });
  };
  const clear = () => {
    setActor('');
    setAction('');
    onChange({ actor: undefined, action: undefined, project: undefined, from: undefined, to: undefined });
  };
  return (
    <form onSubmit={submit} aria-label="Filter the audit log" className="grid grid-cols-1 gap-3 rounded-lg border border-line bg-paper-raised p-4 sm:grid-cols-2 lg:grid-cols-[repeat(5,minmax(0,1fr))_auto] lg:items-end">
      <div>
        <FieldLabel htmlFor={ids.actor}>Who (e-mail)</FieldLabel>
        <TextInput id={ids.actor} value={actor} placeholder="qa@example.test" onChange={(event) => setActor(event.target.value)} className="w-full" />
      </div>
      <div>
        <FieldLabel htmlFor={ids.action}>Action</FieldLabel>
        <TextInput id={ids.action} value={action} placeholder="user. or mask.approve" onChange={(event) => setAction(event.target.value)} className="w-full font-mono" />
      </div>
      <div>
        <FieldLabel htmlFor={ids.project}>Project</FieldLabel>
        <Select id={ids.project} value={search.project ?? ''} onChange={(event) => onChange({ project: event.target.value || undefined })} className="w-full">
          <option value="">All projects</option>
          {projects.map((project) => (
            <option key={project.key} value={project.key}>
              {project.name}
              {project.archivedAt ? ' (archived)' : ''}
            </option>
          ))}
        </Select>
      </div>
      <div>
        <FieldLabel htmlFor={ids.from}>From</FieldLabel>
        <TextInput id={ids.from} type="date" value={search.from ?? ''} max={search.to} onChange={(event) => onChange({ from: event.target.value || undefined })} className="w-full" />
      </div>
      <div>
        <FieldLabel htmlFor={ids.to}>To</FieldLabel>
        <TextInput id={ids.to} type="date" value={search.to ?? ''} min={search.from} onChange={(event) => onChange({ to: event.target.value || undefined })} className="w-full" />
      </div>
      <div className="flex gap-2 sm:col-span-2 lg:col-span-1">
        <Button type="submit">Apply</Button>
        <Button variant="ghost" onClick={clear}>
          Clear
        </Button>
      </div>
    </form>
  );
}
