import type { ApiTokenRow } from '@earmark/contracts';
import { useState } from 'react';
import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';
import { InlineError } from '@/components/inline-error';
import { RelativeTime } from '@/components/relative-time';
import { Skeleton } from '@/components/skeleton';
import { cn } from '@/lib/cn';
import { formatDateTime } from '@/lib/format-time';
import { useRevokeToken } from '../api/revoke-token';
import { describeExpiry } from '../utils/token-expiry';
import { scopeDescriptions } from './scopes';

function RevokeDialog({ projectKey, token, onClose }: { projectKey: string; token: ApiTokenRow | null; onClose: () => void }) {
  const revoke = useRevokeToken(projectKey);
  const close = () => {
    revoke.reset();
    onClose();
  };
  return (
    <Dialog
      open={token !== null}
      onClose={close}
      title={token ? `Revoke “${token.name}”?` : 'Revoke token'}
      footer={
        <>
          <Button variant="secondary" onClick={close} data-autofocus="">
            Cancel
          </Button>
          <Button
            busy={revoke.isPending}
            className="bg-fail hover:bg-fail/90 active:bg-fail"
            onClick={() => token && revoke.mutate(token.id, { onSuccess: close })}
          >
            Revoke
          </Button>
        </>
      }
    >
      <p className="text-sm text-ink-700">
        Pipelines using the token starting <code className="font-mono text-ink-900">{token?.prefix}</code> will be refused from
        now on. This cannot be undone; create a new token to restore access.
      </p>
      {revoke.error ? <InlineError error={revoke.error} className="mt-3" /> : null}
    </Dialog>
  );
}

/** A project's CI tokens, newest first; revoked ones stay listed, struck through in words. */
export function TokensTable({ projectKey, tokens }: { projectKey: string; tokens: ApiTokenRow[] }) {
  const [revoking, setRevoking] = useState<ApiTokenRow | null>(null);
  const sorted = [...tokens].sort((a, b) => b.createdAt.localeCompare(a.createdAt));
  return (
    <>
      <div className="relative overflow-x-auto rounded-lg border border-line bg-paper-raised">
        <table aria-label="API tokens" className="w-full min-w-[820px] border-collapse text-sm">
          <thead>
            <tr className="border-b border-line text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
              <th scope="col" className="h-10 px-4">Name</th>
              <th scope="col" className="px-4">Prefix</th>
              <th scope="col" className="px-4">Scopes</th>
              <th scope="col" className="px-4">Created</th>
              <th scope="col" className="px-4">Last used</th>
              <th scope="col" className="px-4">Status</th>
              <th scope="col" className="px-4"><span className="sr-only">Actions</span></th>
            </tr>
          </thead>
          <tbody>
            {sorted.map((token) => {
              const revoked = token.revokedAt !== null;
              const expiry = describeExpiry(token.expiresAt);
              const expired = expiry?.expired === true;
              return (
                <tr key={token.id} data-token-id={token.id} className={cn('border-b border-line last:border-b-0', (revoked || expired) && 'text-ink-500')}>
                  <td className="px-4 py-3 font-medium text-ink-900">{token.name}</td>
                  <td className="px-4 py-3">
                    <code className="rounded bg-ink-900/[0.05] px-1.5 py-0.5 font-mono text-[12.5px]">{token.prefix}…</code>
                  </td>
                  <td className="px-4 py-3">
                    <ul className="flex flex-wrap gap-1">
                      {token.scopes.map((scope) => (
                        <li key={scope} title={scopeDescriptions[scope].detail} className="rounded-[5px] border border-line-strong px-1.5 font-mono text-[11.5px] text-ink-700">
                          {scope}
                        </li>
                      ))}
                    </ul>
                  </td>
                  <td className="px-4 py-3 text-ink-600">
                    <RelativeTime iso={token.createdAt} />
                  </td>
                  <td className="px-4 py-3 text-ink-600">
                    {token.lastUsedAt ? <RelativeTime iso={token.lastUsedAt} /> : <span className="text-ink-400">Never</span>}
                  </td>
                  <td className="px-4 py-3">
                    {revoked && token.revokedAt ? (
                      <span className="inline-flex items-center gap-1.5 text-[13px]">
                        <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3">
                          <circle cx="6" cy="6" r="4.5" fill="none" stroke="currentColor" strokeWidth="1.3" />
                          <path d="m3 9 6-6" stroke="currentColor" strokeWidth="1.3" />
                        </svg>
                        Revoked <RelativeTime iso={token.revokedAt} />
                      </span>
                    ) : expired && token.expiresAt ? (
                      <span className="inline-flex items-center gap-1.5 text-[13px] text-fail" title={formatDateTime(token.expiresAt)}>
                        <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3">
                          <circle cx="6" cy="6" r="4.5" fill="none" stroke="currentColor" strokeWidth="1.3" />
                          <path d="M6 3.5V6l1.6 1.2" fill="none" stroke="currentColor" strokeWidth="1.3" strokeLinecap="round" />
                        </svg>
                        Expired
                        <span className="text-ink-500">· {expiry.text}</span>
                      </span>
                    ) : (
                      <span className="inline-flex items-center gap-1.5 text-[13px] text-ink-800">
                        <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3">
                          <circle cx="6" cy="6" r="4.5" fill="currentColor" />
                        </svg>
                        Active
                        {expiry && token.expiresAt ? (
                          <span className="text-ink-500" title={formatDateTime(token.expiresAt)}>
                            · {expiry.text}
                          </span>
                        ) : (
                          <span className="text-ink-500">· never expires</span>
                        )}
                      </span>
                    )}
                  </td>
                  <td className="px-4 py-3 text-right">
                    {revoked || expired ? null : (
                      <Button variant="secondary" className="h-8" onClick={() => setRevoking(token)}>
                        Revoke
                      </Button>
                    )}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <RevokeDialog projectKey={projectKey} token={revoking} onClose={() => setRevoking(null)} />
    </>
  );
}

export function TokensTableSkeleton() {
  return (
    <div className="rounded-lg border border-line bg-paper-raised" aria-hidden="true">
      <div className="h-10 border-b border-line" />
      {[0, 1, 2].map((row) => (
        <div key={row} className="flex items-center gap-8 border-b border-line px-4 py-4 last:border-b-0">
          <Skeleton className="h-4 w-36" />
          <Skeleton className="h-4 w-20" />
          <Skeleton className="h-4 w-40" />
          <Skeleton className="ml-auto h-8 w-20" />
        </div>
      ))}
    </div>
  );
}
