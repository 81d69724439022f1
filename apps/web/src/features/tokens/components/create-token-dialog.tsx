import { CreateApiTokenRequest, tokenScopes, type CreatedApiToken, type TokenScope } from '@earmark/contracts';
import { useEffect, useId, useRef, useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { CopyButton } from '@/components/copy-button';
import { Dialog } from '@/components/dialog';
import { Select, TextInput } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { useCreateToken } from '../api/create-token';
import { expiryChoiceLabels, expiryChoices, expiryInstant, localDateInputValue, type ExpiryChoice } from '../utils/token-expiry';
import { scopeDescriptions } from './scopes';

function SecretView({ token }: { token: CreatedApiToken }) {
  const copyRef = useRef<HTMLSpanElement>(null);
  // The form (and its focused button) just disappeared; put focus on the one useful action.
  useEffect(() => copyRef.current?.querySelector('button')?.focus(), []);
  return (
    <div className="space-y-4">
      <div className="flex gap-3 rounded-md border border-brass-300 bg-brass-50 px-3.5 py-3 text-sm text-ink-900">
        <svg viewBox="0 0 16 16" aria-hidden="true" className="mt-0.5 size-4 shrink-0 text-brass-700">
          <path d="M8 1.5 15 14H1Z" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinejoin="round" />
          <path d="M8 6v3.5" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" />
          <circle cx="8" cy="11.6" r="0.9" fill="currentColor" />
        </svg>
        <p>
          <strong className="font-semibold">Copy this secret now — you will not see it again.</strong> Earmark keeps only a
          hash of it. Store it in your CI system&apos;s secret store; if it is lost, revoke the token and create a new one.
        </p>
      </div>
      <div>
        <p className="mb-1.5 text-sm font-medium text-ink-800">
          Secret of <span className="font-semibold">{token.name}</span>
        </p>
        <div className="flex items-center gap-2">
          <code
            data-testid="token-secret"
            className="block min-w-0 flex-1 rounded-md border border-line-strong bg-ink-950 px-3 py-2 font-mono text-[13px] break-all text-paper select-all"
          >
            {token.secret}
          </code>
          <span ref={copyRef} className="shrink-0">
            <CopyButton value={token.secret} />
          </span>
        </div>
      </div>
    </div>
  );
}

/**
 * Create a CI token: name and scopes first, then — once — the secret. Closing the dialog
 * resets the mutation so the secret is gone from memory, not just from view.
 */
export function CreateTokenDialog({ projectKey, open, onClose }: { projectKey: string; open: boolean; onClose: () => void }) {
  const ids = { name: useId(), nameError: useId(), expiry: useId(), expiryDate: useId(), expiryError: useId() };
  const [name, setName] = useState('');
  const [expiry, setExpiry] = useState<ExpiryChoice>('never');
  const [expiryDate, setExpiryDate] = useState('');
  const [scopes, setScopes] = useState<TokenScope[]>(['submit-captures', 'read-verdicts']);
  const [problem, setProblem] = useState<{ name?: string; scopes?: string; expiry?: string }>({});
  const create = useCreateToken(projectKey);

  const close = () => {
    create.reset();
    setName('');
    setScopes(['submit-captures', 'read-verdicts']);
    setExpiry('never');
    setExpiryDate('');
    setProblem({});
    onClose();
  };

  const onSubmit = (event: FormEvent) => {
    event.preventDefault();
    const until = expiryInstant(expiry, expiryDate, new Date());
    // "Never" sends no expiry at all, as before expiry existed.
    const parsed = CreateApiTokenRequest.safeParse({ name: name.trim(), scopes, ...('expiresAt' in until && until.expiresAt ? { expiresAt: until.expiresAt } : {}) });
    if (!parsed.success || 'error' in until) {
      const fields = new Set(parsed.error?.issues.map((issue) => issue.path[0]));
      setProblem({
        name: fields.has('name') ? 'Give the token a name (up to 80 characters), e.g. the pipeline that uses it.' : undefined,
        scopes: fields.has('scopes') ? 'Choose at least one scope.' : undefined,
        expiry: 'error' in until ? until.error : undefined,
      });
      return;
    }
    setProblem({});
    create.mutate(parsed.data);
  };

  const created = create.data;

  return (
    <Dialog
      open={open}
      onClose={close}
      title={created ? 'Token created' : 'Create an API token'}
      description={created ? undefined : 'For a CI pipeline of this project. Tokens act for the project, not for you.'}
      footer={
        created ? (
          <Button key="done" onClick={close}>
            Done
          </Button>
        ) : (
          <>
            <Button key="cancel" variant="secondary" onClick={close}>
              Cancel
            </Button>
            <Button key="create" type="submit" form="create-token-form" busy={create.isPending}>
              Create token
            </Button>
          </>
        )
      }
    >
      {created ? (
        <SecretView token={created} />
      ) : (
        <form id="create-token-form" noValidate onSubmit={onSubmit} className="space-y-5">
          <div>
            <label htmlFor={ids.name} className="mb-1.5 block text-sm font-medium text-ink-800">
              Name
            </label>
            <TextInput
              id={ids.name}
              value={name}
              data-autofocus=""
              maxLength={80}
              placeholder="e.g. gitlab-main-pipeline"
              aria-invalid={problem.name ? true : undefined}
              aria-describedby={problem.name ? ids.nameError : undefined}
              onChange={(event) => setName(event.target.value)}
              className="w-full"
            />
            {problem.name ? (
              <p id={ids.nameError} className="mt-1.5 text-[13px] text-fail">
                {problem.name}
              </p>
            ) : null}
          </div>
          <fieldset>
            <legend className="mb-1.5 text-sm font-medium text-ink-800">Scopes</legend>
            <div className="space-y-2">
              {tokenScopes.map((scope) => (
                <label key={scope} className="flex cursor-pointer gap-3 rounded-md border border-line px-3 py-2.5 hover:border-line-strong">
                  <input
                    type="checkbox"
                    className="mt-0.5 size-4 accent-ink-900"
                    checked={scopes.includes(scope)}
                    onChange={(event) =>
                      setScopes((current) => (event.target.checked ? [...current, scope] : current.filter((s) => s !== scope)))
                    }
                  />
                  <span>
                    <span className="block text-sm font-medium text-ink-900">
                      {scopeDescriptions[scope].label} <code className="ml-1 font-mono text-[11.5px] text-ink-500">{scope}</code>
                    </span>
                    <span className="block text-[13px] text-ink-600">{scopeDescriptions[scope].detail}</span>
                  </span>
                </label>
              ))}
            </div>
            {problem.scopes ? <p className="mt-1.5 text-[13px] text-fail">{problem.scopes}</p> : null}
          </fieldset>
          <div>
            <label htmlFor={ids.expiry} className="mb-1.5 block text-sm font-medium text-ink-800">
              Expires
            </label>
            <div className="flex flex-wrap items-center gap-2">
              <Select id={ids.expiry} value={expiry} onChange={(event) => setExpiry(event.target.value as ExpiryChoice)} className="w-44">
                {expiryChoices.map((choice) => (
                  <option key={choice} value={choice}>
                    {expiryChoiceLabels[choice]}
                  </option>
                ))}
              </Select>
              {expiry === 'date' ? (
                <TextInput
                  id={ids.expiryDate}
                  type="date"
                  aria-label="Last day of use"
                  min={localDateInputValue(new Date())}
                  value={expiryDate}
                  aria-invalid={problem.expiry ? true : undefined}
                  aria-describedby={problem.expiry ? ids.expiryError : undefined}
                  onChange={(event) => setExpiryDate(event.target.value)}
                  className="w-44"
                />
              ) : null}
            </div>
            <p className="mt-1.5 text-[13px] text-ink-600">
              After this the API refuses the token and the pipeline&apos;s log says it expired. A picked day is usable to its end.
            </p>
            {problem.expiry ? (
              <p id={ids.expiryError} className="mt-1.5 text-[13px] text-fail">
                {problem.expiry}
              </p>
            ) : null}
          </div>
          {create.error ? <InlineError error={create.error} /> : null}
        </form>
      )}
    </Dialog>
  );
}
