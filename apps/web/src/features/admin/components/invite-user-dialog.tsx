import { ACCOUNT_LINK_TTL_HOURS, InviteUserRequest } from '@earmark/contracts';
import { useId, useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';
import { TextInput } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { notify } from '@/components/toast';
import { formatDateTime } from '@/lib/format-time';
import { useInviteUser } from '../api/users';

/** Invite a person by e-mail: they get a one-time link to choose their password. */
export function InviteUserDialog({ open, onClose }: { open: boolean; onClose: () => void }) {
  const ids = { email: useId(), name: useId(), admin: useId() };
  const [email, setEmail] = useState('');
  const [displayName, setDisplayName] = useState('');
  const [isAdmin, setIsAdmin] = useState(false);
  const [problem, setProblem] = useState<{ email?: string; displayName?: string }>({});
  const invite = useInviteUser();

  const close = () => {
    invite.reset();
    setEmail('');
    setDisplayName('');
    setIsAdmin(false);
    setProblem({});
    onClose();
  };

  const onSubmit = (event: FormEvent) => {
    event.preventDefault();
    const parsed = InviteUserRequest.safeParse({ email: email.trim(), displayName, isAdmin });
    if (!parsed.success) {
      const fields = new Set(parsed.error.issues.map((issue) => issue.path[0]));
      setProblem({
        email: fields.has('email') ? 'Enter the e-mail address the invitation goes to.' : undefined,
        displayName: fields.has('displayName') ? 'Enter the name colleagues know the person by (up to 120 characters).' : undefined,
      });
      return;
    }
    setProblem({});
    invite.mutate(parsed.data, {
      onSuccess: (result) => {
        notify.success(`Invitation sent to ${result.user.email}`, `The link to choose a password works once, until ${formatDateTime(result.expiresAt)}.`);
        close();
      },
      onError: () => notify.error('The invitation was not sent', 'See the dialog for the reason.'),
    });
  };

  return (
    <Dialog
      open={open}
      onClose={close}
      title="Invite a person"
      description={`They get an e-mail with a link to choose their password; it works once, for ${ACCOUNT_LINK_TTL_HOURS} hours. Add them to projects after.`}
      footer={
        <>
          <Button variant="secondary" onClick={close}>
            Cancel
          </Button>
          <Button type="submit" form="invite-user-form" busy={invite.isPending}>
            Send invitation
          </Button>
        </>
      }
    >
      <form id="invite-user-form" noValidate onSubmit={onSubmit} className="space-y-4">
        <div>
          <label htmlFor={ids.email} className="mb-1.5 block text-sm font-medium text-ink-800">
            E-mail
          </label>
          <TextInput
            id={ids.email}
            type="email"
            value={email}
            data-autofocus=""
            autoComplete="off"
            aria-invalid={problem.email ? true : undefined}
            onChange={(event) => setEmail(event.target.value)}
            className="w-full"
          />
          {problem.email ? <p className="mt-1.5 text-[13px] text-fail">{problem.email}</p> : null}
        </div>
        <div>
          <label htmlFor={ids.name} className="mb-1.5 block text-sm font-medium text-ink-800">
            Name
          </label>
          <TextInput
            id={ids.name}
            value={displayName}
            maxLength={120}
            aria-invalid={problem.displayName ? true : undefined}
            onChange={(event) => setDisplayName(event.target.value)}
            className="w-full"
          />
          {problem.displayName ? <p className="mt-1.5 text-[13px] text-fail">{problem.displayName}</p> : null}
        </div>
        <label htmlFor={ids.admin} className="flex cursor-pointer gap-3 rounded-md border border-line px-3 py-2.5 hover:border-line-strong">
          <input id={ids.admin} type="checkbox" className="mt-0.5 size-4 accent-ink-900" checked={isAdmin} onChange={(event) => setIsAdmin(event.target.checked)} />
          <span>
            <span className="block text-sm font-medium text-ink-900">Administrator</span>
            <span className="block text-[13px] text-ink-600">Manages people, projects, members and API tokens, and reads every project.</span>
          </span>
        </label>
        {invite.error ? <InlineError error={invite.error} /> : null}
      </form>
    </Dialog>
  );
}
