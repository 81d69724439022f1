import type { CurrentUser } from '@earmark/contracts';
import { useId } from 'react';
import { Link } from 'react-router';
import { InlineError } from '@/components/inline-error';
import { roleLabels } from '@/components/role-badge';
import { Skeleton } from '@/components/skeleton';
import { Spinner } from '@/components/spinner';
import { Switch } from '@/components/switch';
import { notify } from '@/components/toast';
import { useSubscription } from '@/features/projects/api/get-subscription';
import { useSetSubscription } from '@/features/projects/api/set-subscription';
import { MAIL_SECTION_ID } from '@/features/projects/components/mail-subscription';
import { paths } from '@/lib/paths';

type Membership = CurrentUser['memberships'][number];

/** One project's build-failure mail for the signed-in member; each switch saves on its own. */
function SubscriptionRow({ membership }: { membership: Membership }) {
  const labelId = useId();
  const descriptionId = useId();
  const subscription = useSubscription(membership.projectKey);
  const update = useSetSubscription(membership.projectKey);
  const on = update.isPending ? update.variables : subscription.data?.buildFailures;

  const save = (next: boolean) =>
    update.mutate(next, {
      onSuccess: (saved) =>
        notify.success(
          saved.buildFailures ? `Build-failure mail on for ${membership.projectName}` : `Build-failure mail off for ${membership.projectName}`,
          saved.buildFailures ? 'A mail comes when one of its builds fails or cannot be judged.' : 'Its builds no longer mail you.',
        ),
      onError: (error) => notify.error(`Mail setting for ${membership.projectName} not saved`, error instanceof Error ? error.message : undefined),
    });

  return (
    <li data-project={membership.projectKey} className="px-4 py-3.5 sm:px-5">
      <div className="flex items-center justify-between gap-4">
        <div className="min-w-0">
          <p id={labelId} className="truncate text-sm font-medium text-ink-900">
            <span className="sr-only">Build-failure mail for </span>
            <Link to={`${paths.project(membership.projectKey)}#${MAIL_SECTION_ID}`} className="hover:underline">
              {membership.projectName}
            </Link>
          </p>
          <p id={descriptionId} className="mt-0.5 truncate text-xs text-ink-500">
            <span className="font-mono">{membership.projectKey}</span> · {roleLabels[membership.role]}
          </p>
        </div>
        {subscription.isPending ? (
          <Skeleton className="h-6 w-20" />
        ) : subscription.isError ? null : (
          <div className="flex shrink-0 items-center gap-2.5">
            {update.isPending ? <Spinner /> : null}
            <span className="w-6 text-right text-sm font-medium text-ink-900" aria-hidden="true">
              {on ? 'On' : 'Off'}
            </span>
            <Switch checked={on === true} busy={update.isPending} labelledBy={labelId} describedBy={descriptionId} onChange={save} />
          </div>
        )}
      </div>
      {subscription.isError ? <InlineError error={subscription.error} className="mt-3" /> : null}
      {update.isError ? <InlineError error={update.error} className="mt-3" /> : null}
    </li>
  );
}

/** Build-failure mail (with drift notices) per project the user belongs to. */
export function MailSubscriptions({ memberships }: { memberships: Membership[] }) {
  if (memberships.length === 0) {
    return (
      <p className="max-w-2xl rounded-lg border border-line bg-paper-raised px-5 py-4 text-sm text-ink-600">
        You are not a member of any project, so no project mail reaches you. An administrator can add you to one.
      </p>
    );
  }
  return (
    <ul aria-label="Build-failure mail per project" className="max-w-2xl divide-y divide-line rounded-lg border border-line bg-paper-raised">
      {memberships.map((membership) => (
        <SubscriptionRow key={membership.projectKey} membership={membership} />
      ))}
    </ul>
  );
}
