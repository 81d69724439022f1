import type { UserRow } from '@earmark/contracts';
import { useState } from 'react';
import { ActionConfirmDialog } from '@/components/action-confirm-dialog';
import { Button } from '@/components/button';
import { RelativeTime } from '@/components/relative-time';
import { RoleBadge } from '@/components/role-badge';
import { notify } from '@/components/toast';
import { errorDetail } from '../utils/error-text';
import { cn } from '@/lib/cn';
import { formatDateTime } from '@/lib/format-time';
import { useSendPasswordReset, useUpdateUser } from '../api/users';
import { StatusBadge } from './status-badge';

type Pending = { kind: 'disable' | 'reset'; user: UserRow } | null;

/** Everyone in the workspace with what an administrator can do to each; `highlight` marks one row (a link from the audit log). */
export function UsersTable({ users, currentUserId, highlight }: { users: UserRow[]; currentUserId: string; highlight?: string }) {
  const [pending, setPending] = useState<Pending>(null);
  const update = useUpdateUser();
  const reset = useSendPasswordReset();
  const close = () => {
    update.reset();
    reset.reset();
    setPending(null);
  };

  const enable = (user: UserRow) =>
    update.mutate(
      { userId: user.id, change: { disabled: false } },
      {
        onSuccess: () => notify.success(`${user.displayName} can sign in again`),
        onError: (error) => notify.error(`${user.displayName} was not enabled`, errorDetail(error)),
      },
    );

  const confirm = () => {
    if (!pending) return;
    const { user } = pending;
    if (pending.kind === 'disable') {
      update.mutate(
        { userId: user.id, change: { disabled: true } },
        {
          onSuccess: () => {
            notify.success(`${user.displayName} is disabled`, 'Their sessions ended; they can no longer sign in.');
            close();
          },
        },
      );
    } else {
      reset.mutate(user.id, {
        onSuccess: (sent) => {
          notify.success(`Password link sent to ${user.email}`, `It works once, until ${formatDateTime(sent.expiresAt)}.`);
          close();
        },
      });
    }
  };

  return (
    <>
      <div className="overflow-x-auto rounded-lg border border-line bg-paper-raised">
        <table aria-label="Users" className="w-full min-w-[760px] border-collapse text-sm">
          <thead>
            <tr className="border-b border-line text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
              <th scope="col" className="h-10 px-4">Person</th>
              <th scope="col" className="px-4">Role</th>
              <th scope="col" className="px-4">Status</th>
              <th scope="col" className="px-4">Last sign-in</th>
              <th scope="col" className="px-4 text-right">Actions</th>
            </tr>
          </thead>
          <tbody>
            {users.map((user) => {
              const self = user.id === currentUserId;
              return (
                <tr
                  key={user.id}
                  aria-current={highlight === user.email ? 'true' : undefined}
                  className={cn('border-b border-line align-middle last:border-b-0', highlight === user.email && 'bg-brass-50')}
                >
                  <td className="px-4 py-2.5">
                    <span className="block font-medium text-ink-950">
                      {user.displayName}
                      {self ? <span className="ml-1.5 text-xs font-normal text-ink-500">(you)</span> : null}
                    </span>
                    <span className="block text-[13px] text-ink-600">{user.email}</span>
                  </td>
                  <td className="px-4 py-2.5">{user.isAdmin ? <RoleBadge role="admin" /> : <span className="text-ink-600">Project roles only</span>}</td>
                  <td className="px-4 py-2.5">
                    <StatusBadge status={user.status} />
                  </td>
                  <td className="px-4 py-2.5 text-ink-600">{user.lastLoginAt ? <RelativeTime iso={user.lastLoginAt} /> : 'Never'}</td>
                  <td className="px-4 py-2.5">
                    <div className="flex justify-end gap-2">
                      {user.status !== 'disabled' ? (
                        <Button variant="secondary" className="h-8 px-2.5 text-[13px]" onClick={() => setPending({ kind: 'reset', user })}>
                          {user.status === 'invited' ? 'Resend invitation' : 'Reset password'}
                        </Button>
                      ) : null}
                      {user.status === 'disabled' ? (
                        <Button variant="secondary" className="h-8 px-2.5 text-[13px]" busy={update.isPending && update.variables?.userId === user.id} onClick={() => enable(user)}>
                          Enable
                        </Button>
                      ) : (
                        <Button
                          variant="secondary"
                          className="h-8 px-2.5 text-[13px]"
                          disabled={self}
                          title={self ? 'Ask another administrator to disable your account.' : undefined}
                          onClick={() => setPending({ kind: 'disable', user })}
                        >
                          Disable
                        </Button>
                      )}
                    </div>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <ActionConfirmDialog
        open={pending !== null}
        title={pending?.kind === 'disable' ? `Disable ${pending.user.displayName}?` : `Send ${pending?.user.displayName ?? ''} a password link?`}
        confirmLabel={pending?.kind === 'disable' ? 'Disable' : 'Send link'}
        danger={pending?.kind === 'disable'}
        busy={update.isPending || reset.isPending}
        error={pending?.kind === 'disable' ? update.error : reset.error}
        onConfirm={confirm}
        onClose={close}
      >
        {pending?.kind === 'disable' ? (
          <p>
            {pending.user.email} is signed out everywhere at once and cannot sign in until an administrator enables the account again. Their
            memberships, comments and decisions stay.
          </p>
        ) : pending ? (
          <p>
            {pending.user.email} gets an e-mail with a one-time link to choose a new password. Their current password keeps working until they
            use it; earlier links stop working.
          </p>
        ) : null}
      </ActionConfirmDialog>
    </>
  );
}
