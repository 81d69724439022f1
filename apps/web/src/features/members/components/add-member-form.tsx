import { ProjectRole, type MemberRow, type UserRow } from '@earmark/contracts';
import { useId, useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { FieldLabel, Select } from '@/components/form-controls';
import { roleLabels } from '@/components/role-badge';
import { notify } from '@/components/toast';
import { ApiError } from '@/lib/api-error';
import { useSetMember } from '../api/members';

/** Adds an existing person (not yet a member, not disabled) with a role. People are invited in the admin area first. */
export function AddMemberForm({ projectKey, users, members }: { projectKey: string; users: UserRow[]; members: MemberRow[] }) {
  const ids = { user: useId(), role: useId() };
  const memberIds = new Set(members.map((m) => m.userId));
  const candidates = users.filter((u) => !memberIds.has(u.id) && u.status !== 'disabled');
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<ProjectRole>('engineer');
  const setMember = useSetMember(projectKey);

  const submit = (event: FormEvent) => {
    event.preventDefault();
    const person = candidates.find((u) => u.email === email);
    if (!person) {
      notify.error('Choose a person to add');
      return;
    }
    setMember.mutate(
      { email, role },
      {
        onSuccess: () => {
          notify.success(`${person.displayName} added to ${projectKey} as ${roleLabels[role]}`);
          setEmail('');
        },
        onError: (error) => notify.error(`${person.displayName} was not added`, error instanceof ApiError ? (error.detail ?? error.title) : undefined),
      },
    );
  };

  return (
    <form onSubmit={submit} aria-label="Add a member" className="flex flex-col gap-3 rounded-lg border border-line bg-paper-raised p-4 sm:flex-row sm:items-end">
      <div className="min-w-0 flex-1">
        <FieldLabel htmlFor={ids.user}>Person</FieldLabel>
        <Select id={ids.user} value={email} onChange={(event) => setEmail(event.target.value)} className="w-full">
          <option value="">{candidates.length ? 'Choose a person…' : 'Everyone is a member already'}</option>
          {candidates.map((u) => (
            <option key={u.id} value={u.email}>
              {u.displayName} ({u.email}){u.status === 'invited' ? ' — invited' : ''}
            </option>
          ))}
        </Select>
      </div>
      <div>
        <FieldLabel htmlFor={ids.role}>Role</FieldLabel>
        <Select id={ids.role} value={role} onChange={(event) => setRole(ProjectRole.parse(event.target.value))} className="w-full sm:w-44">
          {ProjectRole.options.map((r) => (
            <option key={r} value={r}>
              {roleLabels[r]}
            </option>
          ))}
        </Select>
      </div>
      <Button type="submit" busy={setMember.isPending} disabled={!email}>
        Add member
      </Button>
    </form>
  );
}
