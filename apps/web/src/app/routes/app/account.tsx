import type { QueryClient } from '@tanstack/react-query';
import type { ReactNode } from 'react';
import { PageHeader } from '@/components/page-header';
import { RoleBadge } from '@/components/role-badge';
import { ChangePasswordForm } from '@/features/account/components/change-password-form';
import { MailSubscriptions } from '@/features/account/components/mail-subscriptions';
import { getMeQueryOptions, useMe } from '@/features/auth/api/get-me';
import { highestRole } from '@/features/auth/utils/highest-role';
import { requireSession } from '../require-session';

export const accountLoader = (queryClient: QueryClient) =>
  requireSession(async () => {
    await queryClient.ensureQueryData(getMeQueryOptions());
    return null;
  });

function Section({ id, title, description, children }: { id: string; title: string; description: string; children: ReactNode }) {
  return (
    <section aria-labelledby={id} className="grid gap-4 border-b border-line pb-8 last:border-b-0 lg:grid-cols-[18rem_minmax(0,1fr)] lg:gap-10">
      <div>
        <h2 id={id} className="text-base font-semibold text-ink-950">
          {title}
        </h2>
        <p className="mt-1 text-sm text-ink-600">{description}</p>
      </div>
      <div className="min-w-0">{children}</div>
    </section>
  );
}

/** Every signed-in user's own settings: password and build mail per project. */
export function AccountRoute() {
  const me = useMe();
  if (!me.data) return null;
  const user = me.data;
  const role = highestRole(user);
  return (
    <div className="space-y-8">
      <title>Account · Earmark</title>
      <PageHeader
        eyebrow="Your account"
        title={user.displayName}
        titleAside={role ? <RoleBadge role={role} /> : null}
        description={user.email}
      />
      <Section id="account-password" title="Password" description="Changing it signs you out everywhere else; this browser stays signed in.">
        <ChangePasswordForm />
      </Section>
      <Section
        id="account-mail"
        title="Build-failure mail"
        description="Per project: a mail when a build fails or cannot be judged, with drift notices. Each switch saves at once."
      >
        <MailSubscriptions memberships={user.memberships} />
      </Section>
    </div>
  );
}
