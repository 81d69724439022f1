import { ProjectRole, type MemberRow } from '@earmark/contracts';
import { useState } from 'react';
import { ActionConfirmDialog } from '@/components/action-confirm-dialog';
import { Button } from '@/components/button';
import { Select } from '@/components/form-controls';
import { roleLabels } from '@/components/role-badge';
import { notify } from '@/components/toast';
import { ApiError } from '@/lib/api-error';
import { useRemoveMember, useSetMember } from '../api/members';

const detailOf = (error: unknown) => (error instanceof ApiError ? (error.detail ?? error.title) : 'The change could not be saved.');

/** A project's members: change a role in place (saved at once), remove with a confirmation. */
export function MembersTable({ projectKey, members }: { projectKey: string; members: MemberRow[] }) {
  const setMember = useSetMember(projectKey);
  const remove = useRemoveMember(projectKey);
  const [removing, setRemoving] = useState<MemberRow | null>(null);
  const close = () => {
    remove.reset();
    setRemoving(null);
  };

  const changeRole = (member: MemberRow, role: ProjectRole) =>
    setMember.mutate(
      { email: member.email, role },
      {
        onSuccess: () => notify.success(`${member.displayName} is now ${roleLabels[role]} in ${projectKey}`),
        onError: (error) => notify.error(`The role of ${member.displayName} did not change`, detailOf(error)),
      },
    );

  return (
    <>
      <div className="overflow-x-auto rounded-lg border border-line bg-paper-raised">
        <table aria-label="Members" className="w-full min-w-[600px] border-collapse text-sm">
          <thead>
            <tr className="border-b border-line text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
              <th scope="col" className="h-10 px-4">Member</th>
              <th scope="col" className="px-4">Role</th>
              <th scope="col" className="px-4 text-right">Actions</th>
            </tr>
          </thead>
          <tbody>
            {members.map((member) => (
              <tr key={member.userId} className="border-b border-line align-middle last:border-b-0">
                <td className="px-4 py-2.5">
                  <span className="block font-medium text-ink-950">{member.displayName}</span>
                  <span className="block text-[13px] text-ink-600">{member.email}</span>
                </td>
                <td className="px-4 py-2.5">
                  <Select
                    aria-label={`Role of ${member.displayName}`}
                    value={member.role}
                    disabled={setMember.isPending && setMember.variables?.email === member.email}
                    onChange={(event) => changeRole(member, ProjectRole.parse(event.target.value))}
                    className="h-8 w-40"
                  >
                    {ProjectRole.options.map((role) => (
                      <option key={role} value={role}>
                        {roleLabels[role]}
                      </option>
                    ))}
                  </Select>
                </td>
                <td className="px-4 py-2.5 text-right">
                  <Button variant="secondary" className="h-8 px-2.5 text-[13px]" onClick={() => setRemoving(member)}>
                    Remove
                  </Button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <ActionConfirmDialog
        open={removing !== null}
        title={`Remove ${removing?.displayName ?? ''} from ${projectKey}?`}
        confirmLabel="Remove"
        busy={remove.isPending}
        error={remove.error}
        onConfirm={() =>
          removing &&
          remove.mutate(removing.userId, {
            onSuccess: () => {
              notify.success(`${removing.displayName} was removed from ${projectKey}`);
              close();
            },
          })
        }
        onClose={close}
      >
        <p>They no longer see the project or get its mail. What they wrote and decided stays, with their name.</p>
      </ActionConfirmDialog>
    </>
  );
}
