import { ChangePasswordRequest } from '@earmark/contracts';
import { useId, useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { TextInput } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { notify } from '@/components/toast';
import { apiFieldIssues, issuesByPath, type FieldIssues } from '@/lib/field-issues';
import { useChangePassword } from '../api/change-password';

type Field = 'currentPassword' | 'newPassword' | 'confirmPassword';

const labels: Record<Field, string> = {
  currentPassword: 'Current password',
  newPassword: 'New password',
  confirmPassword: 'Repeat the new password',
};
/** The contract's messages are fragments ("at least 10 characters"); under a labelled field they read as a sentence. */
const sentence = (message: string) => `${message.charAt(0).toUpperCase()}${message.slice(1)}${message.endsWith('.') ? '' : '.'}`;

const autoComplete: Record<Field, string> = { currentPassword: 'current-password', newPassword: 'new-password', confirmPassword: 'new-password' };

/**
 * Current password, new one twice. The rules (length, 72 bytes of UTF-8) are the contract's,
 * checked here first so most mistakes never reach the API; the API checks the current one.
 */
export function ChangePasswordForm() {
  const baseId = useId();
  const [values, setValues] = useState<Record<Field, string>>({ currentPassword: '', newPassword: '', confirmPassword: '' });
  const [issues, setIssues] = useState<FieldIssues>({});
  const change = useChangePassword();

  const onSubmit = (event: FormEvent) => {
    event.preventDefault();
    const parsed = ChangePasswordRequest.safeParse({ currentPassword: values.currentPassword, newPassword: values.newPassword });
    const found: FieldIssues = parsed.success ? {} : issuesByPath(parsed.error);
    if (values.confirmPassword !== values.newPassword) found.confirmPassword = ['does not match the new password'];
    setIssues(found);
    if (!parsed.success || Object.keys(found).length > 0) return;
    change.mutate(parsed.data, {
      onSuccess: () => {
        setValues({ currentPassword: '', newPassword: '', confirmPassword: '' });
        notify.success('Password changed', 'You stay signed in here; every other session of yours has been signed out.');
      },
      onError: (error) => {
        setIssues(apiFieldIssues(error));
        notify.error('Password not changed', error instanceof Error ? error.message : undefined);
      },
    });
  };

  const field = (name: Field) => {
    const id = `${baseId}-${name}`;
    const messages = issues[name] ?? [];
    return (
      <div key={name}>
        <label htmlFor={id} className="mb-1.5 block text-sm font-medium text-ink-800">
          {labels[name]}
        </label>
        <TextInput
          id={id}
          type="password"
          autoComplete={autoComplete[name]}
          value={values[name]}
          aria-invalid={messages.length ? true : undefined}
          aria-describedby={messages.length ? `${id}-error` : undefined}
          onChange={(event) => setValues((current) => ({ ...current, [name]: event.target.value }))}
          className="w-full"
        />
        {messages.length ? (
          <p id={`${id}-error`} className="mt-1.5 text-[13px] text-fail">
            {sentence(messages[0] ?? '')}
          </p>
        ) : null}
      </div>
    );
  };

  return (
    <form noValidate onSubmit={onSubmit} aria-label="Change password" className="max-w-md space-y-4">
      {field('currentPassword')}
      {field('newPassword')}
      <p className="-mt-2 text-[13px] text-ink-600">At least 10 characters and at most 72 bytes (letters such as ä count twice).</p>
      {field('confirmPassword')}
      {change.isError && Object.keys(apiFieldIssues(change.error)).length === 0 ? <InlineError error={change.error} /> : null}
      <Button type="submit" busy={change.isPending}>
        Change password
      </Button>
    </form>
  );
}
