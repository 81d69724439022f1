import { LoginRequest, type Session } from '@earmark/contracts';
import { useId, useState, type FormEvent, type ReactNode } from 'react';
import { Button } from '@/components/button';
import { ApiError } from '@/lib/api-error';
import { cn } from '@/lib/cn';
import { useLogin } from '../api/login';

type FieldErrors = Partial<Record<'email' | 'password', string>>;

function fieldErrorsFrom(error: unknown): FieldErrors {
  if (!(error instanceof ApiError)) return {};
  const result: FieldErrors = {};
  for (const { path, message } of error.fieldErrors) {
    if ((path === 'email' || path === 'password') && !result[path]) result[path] = message;
  }
  return result;
}

export function SignInForm({ onSignedIn }: { onSignedIn: (session: Session) => void }) {
  const ids = { email: useId(), password: useId(), alert: useId() };
  const [clientErrors, setClientErrors] = useState<FieldErrors>({});
  const login = useLogin({ onSuccess: onSignedIn });

  const onSubmit = (event: FormEvent<HTMLFormElement>) => {
    event.preventDefault();
    const data = new FormData(event.currentTarget);
    const parsed = LoginRequest.safeParse({
      email: String(data.get('email') ?? '').trim(),
      password: String(data.get('password') ?? ''),
    });
    if (!parsed.success) {
      // Our own wording rather than zod's: these are the only two mistakes a person makes here.
      const paths = new Set(parsed.error.issues.map((issue) => issue.path[0]));
      setClientErrors({
        email: paths.has('email') ? 'Enter the e-mail address you were invited with.' : undefined,
        password: paths.has('password') ? 'Enter your password.' : undefined,
      });
      return;
    }
    setClientErrors({});
    login.mutate(parsed.data);
  };

  const serverErrors = fieldErrorsFrom(login.error);
  const errors: FieldErrors = {
    email: clientErrors.email ?? serverErrors.email,
    password: clientErrors.password ?? serverErrors.password,
  };
  const apiError = login.error instanceof ApiError ? login.error : null;

  return (
    <form noValidate onSubmit={onSubmit} className="space-y-5" aria-describedby={login.error ? ids.alert : undefined}>
      {login.error ? (
        <div
          id={ids.alert}
          role="alert"
          className="flex gap-3 rounded-md border border-fail/30 bg-fail-soft px-3.5 py-3 text-sm text-ink-900"
        >
          <svg viewBox="0 0 16 16" aria-hidden="true" className="mt-0.5 size-4 shrink-0 text-fail">
            <rect x="1" y="1" width="14" height="14" rx="2" fill="currentColor" />
            <path d="m5.2 5.2 5.6 5.6m0-5.6-5.6 5.6" stroke="white" strokeWidth="1.6" strokeLinecap="round" />
          </svg>
          <div>
            <p className="font-semibold">{apiError?.title ?? 'Sign-in failed'}</p>
            <p className="mt-0.5 text-ink-700">
              {apiError ? (apiError.detail ?? 'Please try again.') : 'Something unexpected happened. Please try again.'}
            </p>
          </div>
        </div>
      ) : null}

      <Field id={ids.email} label="Email" error={errors.email}>
        <input
          id={ids.email}
          name="email"
          type="email"
          autoComplete="username"
          inputMode="email"
          autoFocus
          required
          aria-invalid={errors.email ? true : undefined}
          aria-describedby={errors.email ? `${ids.email}-error` : undefined}
          className={inputClass(Boolean(errors.email))}
        />
      </Field>

      <Field id={ids.password} label="Password" error={errors.password}>
        <input
          id={ids.password}
          name="password"
          type="password"
          autoComplete="current-password"
          required
          aria-invalid={errors.password ? true : undefined}
          aria-describedby={errors.password ? `${ids.password}-error` : undefined}
          className={inputClass(Boolean(errors.password))}
        />
      </Field>

      <Button type="submit" busy={login.isPending} className="h-10 w-full">
        Sign in
      </Button>
    </form>
  );
}

function inputClass(invalid: boolean): string {
  return cn(
    'block h-10 w-full rounded-md border bg-white px-3 text-sm text-ink-950 shadow-[inset_0_1px_1px_rgb(0_0_0/0.04)]',
    'placeholder:text-ink-400 focus:outline-none focus:ring-3',
    invalid
      ? 'border-fail focus:border-fail focus:ring-fail/20'
      : 'border-line-strong focus:border-ink-700 focus:ring-brass-300/50',
  );
}

function Field({ id, label, error, children }: { id: string; label: string; error: string | undefined; children: ReactNode }) {
  return (
    <div>
      <label htmlFor={id} className="mb-1.5 block text-sm font-medium text-ink-800">
        {label}
      </label>
      {children}
      {error ? (
        <p id={`${id}-error`} className="mt-1.5 text-[13px] text-fail">
          {error}
        </p>
      ) : null}
    </div>
  );
}
