import { NewPassword } from '@earmark/contracts';
import { useId, useState, type FormEvent } from 'react';
import { Link, useParams } from 'react-router';
import { Button } from '@/components/button';
import { TextInput } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { Wordmark } from '@/components/logo';
import { Skeleton } from '@/components/skeleton';
import { notify } from '@/components/toast';
import { useAccountLink, useSetPasswordWithLink } from '@/features/admin/api/account-link';
import { ApiError } from '@/lib/api-error';
import { formatDateTime } from '@/lib/format-time';
import { paths } from '@/lib/paths';
import { sessionStore } from '@/lib/session-store';

function Frame({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <div className="flex min-h-dvh items-center justify-center bg-paper px-6 py-12">
      <title>{`${title} · Earmark`}</title>
      <div className="w-full max-w-[400px]">
        <div className="mb-8">
          <Wordmark tone="dark" />
        </div>
        {children}
      </div>
    </div>
  );
}

/** The page a mailed invitation or password-reset link opens: choose a password, then sign in. */
export function SetPasswordRoute() {
  const { secret = '' } = useParams();
  const link = useAccountLink(secret);
  const setPassword = useSetPasswordWithLink(secret);
  const ids = { password: useId(), repeat: useId() };
  const [password, setPasswordValue] = useState('');
  const [repeat, setRepeat] = useState('');
  const [problem, setProblem] = useState<{ password?: string; repeat?: string }>({});

  if (link.isPending) {
    return (
      <Frame title="Choose a password">
        <Skeleton className="h-48" />
      </Frame>
    );
  }
  if (link.isError) {
    const detail = link.error instanceof ApiError ? link.error.detail : undefined;
    return (
      <Frame title="Link not valid">
        <h1 className="text-2xl font-semibold tracking-[-0.02em] text-ink-950">This link no longer works</h1>
        <p className="mt-2 text-sm text-ink-700">{detail ?? 'The link could not be checked. Try again in a moment.'}</p>
        <Link to={paths.signIn()} className="mt-6 inline-flex h-9 items-center rounded-md bg-ink-900 px-3.5 text-sm font-medium text-paper hover:bg-ink-800">
          Go to sign-in
        </Link>
      </Frame>
    );
  }

  const { purpose, email, displayName, expiresAt } = link.data;
  if (setPassword.isSuccess) {
    return (
      <Frame title="Password set">
        <h1 className="text-2xl font-semibold tracking-[-0.02em] text-ink-950">Your password is set</h1>
        <p className="mt-2 text-sm text-ink-700">Sign in as {email} with the password you just chose.</p>
        <Link to={paths.signIn()} className="mt-6 inline-flex h-9 items-center rounded-md bg-ink-900 px-3.5 text-sm font-medium text-paper hover:bg-ink-800">
          Sign in
        </Link>
      </Frame>
    );
  }

  const onSubmit = (event: FormEvent) => {
    event.preventDefault();
    const parsed = NewPassword.safeParse(password);
    const next = {
      password: parsed.success ? undefined : `The password needs ${parsed.error.issues[0]?.message ?? 'at least 10 characters'}.`,
      repeat: parsed.success && repeat !== password ? 'The two passwords differ.' : undefined,
    };
    setProblem(next);
    if (next.password || next.repeat) return;
    setPassword.mutate(password, {
      onSuccess: () => {
        // Whoever was signed in in this browser is not the person who just chose a password.
        sessionStore.clear('signed-out');
        notify.success('Password set', `Sign in as ${email}.`);
      },
      onError: () => notify.error('The password was not set', 'See the page for the reason.'),
    });
  };

  const heading = purpose === 'invite' ? `Welcome, ${displayName}` : 'Choose a new password';
  return (
    <Frame title={purpose === 'invite' ? 'Accept invitation' : 'Choose a new password'}>
      <h1 className="text-2xl font-semibold tracking-[-0.02em] text-ink-950">{heading}</h1>
      <p className="mt-1.5 mb-7 text-sm text-ink-600">
        {purpose === 'invite' ? 'Choose the password for your Earmark account' : 'Choose a new password for'} <span className="font-medium text-ink-900">{email}</span>. This
        link works once, until {formatDateTime(expiresAt)}.
      </p>
      <form noValidate onSubmit={onSubmit} className="space-y-5 rounded-xl border border-line bg-paper-raised p-6">
        <div>
          <label htmlFor={ids.password} className="mb-1.5 block text-sm font-medium text-ink-800">
            New password
          </label>
          <TextInput
            id={ids.password}
            type="password"
            autoComplete="new-password"
            value={password}
            aria-invalid={problem.password ? true : undefined}
            aria-describedby={`${ids.password}-hint`}
            onChange={(event) => setPasswordValue(event.target.value)}
            className="h-10 w-full"
          />
          <p id={`${ids.password}-hint`} className={problem.password ? 'mt-1.5 text-[13px] text-fail' : 'mt-1.5 text-[13px] text-ink-500'}>
            {problem.password ?? 'At least 10 characters.'}
          </p>
        </div>
        <div>
          <label htmlFor={ids.repeat} className="mb-1.5 block text-sm font-medium text-ink-800">
            Repeat the password
          </label>
          <TextInput
            id={ids.repeat}
            type="password"
            autoComplete="new-password"
            value={repeat}
            aria-invalid={problem.repeat ? true : undefined}
            onChange={(event) => setRepeat(event.target.value)}
            className="h-10 w-full"
          />
          {problem.repeat ? <p className="mt-1.5 text-[13px] text-fail">{problem.repeat}</p> : null}
        </div>
        {setPassword.error ? <InlineError error={setPassword.error} /> : null}
        <Button type="submit" busy={setPassword.isPending} className="h-10 w-full">
          Set password
        </Button>
      </form>
    </Frame>
  );
}
