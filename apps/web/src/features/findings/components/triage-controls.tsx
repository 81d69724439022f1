import type { FindingRow, FindingState, MemberRow } from '@earmark/contracts';
import type { ReactElement } from 'react';
import { MenuButton, type MenuOption } from '@/components/menu-button';
import { roleLabels } from '@/components/role-badge';
import { cn } from '@/lib/cn';
import { findingStateHints, findingStateLabels, findingStates } from '../utils/finding-states';

/** Menu value meaning "nobody" (user ids are UUIDs, so it cannot collide). */
export const UNASSIGNED = 'none';

const stateGlyphs: Record<FindingState, ReactElement> = {
  open: <circle cx="6" cy="6" r="4.5" fill="none" stroke="currentColor" strokeWidth="1.4" />,
  investigating: (
    <>
      <circle cx="6" cy="6" r="4.5" fill="none" stroke="currentColor" strokeWidth="1.4" />
      <path d="M6 1.5a4.5 4.5 0 0 1 0 9Z" fill="currentColor" />
    </>
  ),
  accepted_deviation: (
    <>
      <rect x="1.5" y="1.5" width="9" height="9" rx="1.5" fill="none" stroke="currentColor" strokeWidth="1.4" />
      <path d="M3.8 6h4.4" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" />
    </>
  ),
  fixed: <path d="m2.5 6.3 2.3 2.2 4.7-5" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" strokeLinejoin="round" />,
  not_a_defect: (
    <>
      <circle cx="6" cy="6" r="4.5" fill="none" stroke="currentColor" strokeWidth="1.4" />
      <path d="m3 9 6-6" stroke="currentColor" strokeWidth="1.4" />
    </>
  ),
};

/** A finding's state as text with its own small glyph (states are not verdicts: ink only). */
export function FindingStateLabel({ state, className }: { state: FindingState; className?: string }) {
  return (
    <span className={cn('inline-flex items-center gap-1.5 whitespace-nowrap text-[13px] text-ink-800', className)}>
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0 text-ink-600">
        {stateGlyphs[state]}
      </svg>
      {findingStateLabels[state]}
    </span>
  );
}

// Only an approved waiver makes a finding an accepted deviation (the API refuses it as a triage
// move), so it is offered as a filter, never as a state to pick: request a waiver instead.
export const stateOptions: MenuOption[] = findingStates.filter((state) => state !== 'accepted_deviation').map((state) => ({
  value: state,
  label: findingStateLabels[state],
  text: findingStateLabels[state],
  hint: findingStateHints[state],
}));

export function assigneeOptions(members: MemberRow[], meId: string | undefined): MenuOption[] {
  // Viewers cannot act on a finding, so they are not offered as assignees.
  const assignable = members.filter((member) => member.role !== 'viewer');
  const me = assignable.find((member) => member.userId === meId);
  const others = assignable.filter((member) => member.userId !== meId).sort((a, b) => a.displayName.localeCompare(b.displayName));
  return [
    ...(me ? [{ value: me.userId, label: `${me.displayName} (me)`, text: `${me.displayName} (me)`, hint: roleLabels[me.role] }] : []),
    ...others.map((member) => ({
      value: member.userId,
      label: member.displayName,
      text: member.displayName,
      hint: `${roleLabels[member.role]} · ${member.email}`,
    })),
    { value: UNASSIGNED, label: 'Unassigned', text: 'Unassigned', hint: 'Back to the shared queue' },
  ];
}

export function StateMenu({
  finding,
  onChange,
  busy,
}: {
  finding: FindingRow;
  onChange: (state: FindingState) => void;
  busy?: boolean;
}) {
  return (
    <MenuButton
      label={
        <>
          <span className="sr-only">State: </span>
          <FindingStateLabel state={finding.state} />
        </>
      }
      menuLabel="Finding state"
      options={stateOptions}
      selected={finding.state}
      busy={busy}
      onSelect={(value) => {
        const state = findingStates.find((candidate) => candidate === value);
        if (state && state !== finding.state) onChange(state);
      }}
    />
  );
}

export function AssignMenu({
  finding,
  options,
  onAssign,
  busy,
}: {
  finding: FindingRow;
  options: MenuOption[];
  onAssign: (assigneeId: string | null) => void;
  busy?: boolean;
}) {
  return (
    <MenuButton
      label="Assign"
      menuLabel="Assign to"
      options={options}
      selected={finding.assignee?.id ?? UNASSIGNED}
      busy={busy}
      buttonClassName="h-7 px-2 text-xs"
      onSelect={(value) => {
        const next = value === UNASSIGNED ? null : value;
        if (next !== (finding.assignee?.id ?? null)) onAssign(next);
      }}
    />
  );
}

export function AssigneeName({ finding }: { finding: FindingRow }) {
  return finding.assignee ? (
    <span className="truncate text-[13px] text-ink-900" title={finding.assignee.email}>
      {finding.assignee.displayName}
    </span>
  ) : (
    <span className="text-[13px] text-ink-400">Unassigned</span>
  );
}
