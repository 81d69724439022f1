import type { Project } from '@earmark/contracts';
import { useEffect, useId, useRef } from 'react';
import { useLocation } from 'react-router';
import { InlineError } from '@/components/inline-error';
import { Skeleton } from '@/components/skeleton';
import { Spinner } from '@/components/spinner';
import { Switch } from '@/components/switch';
import { useSubscription } from '../api/get-subscription';
import { useSetSubscription } from '../api/set-subscription';

/** The anchor build mail links to ("Change it on the project page"). */
export const MAIL_SECTION_ID = 'mail';

/**
 * The member's own build-mail setting for this project: build failures (and drift notices)
 * by mail, on or off. A global admin who is not a member receives no project mail.
 */
export function MailSubscription({ project }: { project: Pick<Project, 'key' | 'myRole'> }) {
  const member = project.myRole !== 'admin';
  const subscription = useSubscription(project.key, member);
  const update = useSetSubscription(project.key);
  const labelId = useId();
  const descriptionId = useId();
  const sectionRef = useRef<HTMLElement>(null);
  const { hash } = useLocation();

  // Mail links here with #mail; the page renders after the browser looked for the anchor.
  useEffect(() => {
    if (hash === `#${MAIL_SECTION_ID}`) sectionRef.current?.scrollIntoView?.({ block: 'start' });
  }, [hash]);

  const on = update.isPending ? update.variables : subscription.data?.buildFailures;
  return (
    <section ref={sectionRef} id={MAIL_SECTION_ID} aria-labelledby={labelId} className="scroll-mt-6 rounded-lg border border-line bg-paper-raised px-5 py-4">
      <div className="flex items-start justify-between gap-6">
        <div>
          <h2 id={labelId} className="text-sm font-semibold text-ink-900">
            Build-failure mail
          </h2>
          <p id={descriptionId} className="mt-1.5 max-w-2xl text-sm text-ink-700">
            When a build of this project fails or cannot be judged, one mail lists every failing and erroring cell with
            links to its captures. Drift notices come with it. On by default for engineers and QA managers; viewers can
            switch it on.
          </p>
        </div>
        {!member ? null : subscription.isPending ? (
          <Skeleton className="h-6 w-20" />
        ) : subscription.isError ? null : (
          <div className="flex items-center gap-2.5">
            {update.isPending ? <Spinner /> : null}
            <span className="w-6 text-right text-sm font-medium text-ink-900" aria-hidden="true">
              {on ? 'On' : 'Off'}
            </span>
            <Switch checked={on === true} busy={update.isPending} labelledBy={labelId} describedBy={descriptionId} onChange={(next) => update.mutate(next)} />
          </div>
        )}
      </div>
      {!member ? (
        <p className="mt-3 text-sm text-ink-500">You are not a member of this project, so its mail does not reach you.</p>
      ) : null}
      {subscription.isError ? <InlineError error={subscription.error} className="mt-3" /> : null}
      {update.isError ? <InlineError error={update.error} className="mt-3" /> : null}
    </section>
  );
}
