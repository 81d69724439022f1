import type { FindingState, MaskRevisionState, WaiverState } from '@earmark/db';
import { ConflictError, ValidationError } from '../errors.js';

/**
 * The state machines of the gate, as data: which move is allowed, by what kind of act, and
 * what a refused move says. Services and judging move states only through `moveTo`, so a
 * transition the table does not hold cannot happen anywhere. (The build's status is not a
 * machine one acts on: it is derived from its captures by `aggregateBuildStatus` in contracts.)
 */

/** Who makes a move: a person through the API, or the gate itself (judging, the sweep, a waiver's approval). */
export type Mover = 'person' | 'gate';

interface Move<S extends string> {
  from: readonly S[];
  to: S;
  act: string;
  /** Which movers may make it; a person never makes a gate-only move. */
  by: readonly Mover[];
}

export interface StateMachine<S extends string> {
  name: string;
  moves: readonly Move<S>[];
}

/** Draft → in review (author submits) → approved (someone else) or rejected; the approved one is superseded by the next. */
export const MASK_REVISION: StateMachine<MaskRevisionState> = {
  name: 'mask revision',
  moves: [
    { from: ['draft'], to: 'in_review', act: 'submit', by: ['person'] },
    { from: ['in_review'], to: 'approved', act: 'approve', by: ['person'] },
    { from: ['in_review'], to: 'rejected', act: 'reject', by: ['person'] },
    { from: ['approved'], to: 'superseded', act: 'supersede', by: ['gate'] },
  ],
};

/** Requested → approved or rejected by someone else; an approved waiver expires on its date or is revoked. */
export const WAIVER: StateMachine<WaiverState> = {
  name: 'waiver',
  moves: [
    { from: ['requested'], to: 'approved', act: 'approve', by: ['person'] },
    { from: ['requested'], to: 'rejected', act: 'reject', by: ['person'] },
    { from: ['approved'], to: 'expired', act: 'expire', by: ['gate'] },
    { from: ['approved'], to: 'revoked', act: 'revoke', by: ['person'] },
  ],
};

/**
 * A finding is triaged by people (open, investigating, fixed, not a defect, in any order, also
 * out of an accepted deviation once the deviation is fixed), but becomes an accepted deviation
 * only through an approved waiver — a second person's decision — and the gate re-opens it when
 * the waiver expires or is revoked.
 */
export const FINDING: StateMachine<FindingState> = {
  name: 'finding',
  moves: [
    ...(['open', 'investigating', 'fixed', 'not_a_defect'] as const).map((to) => ({
      from: ['open', 'investigating', 'fixed', 'not_a_defect', 'accepted_deviation'] as FindingState[],
      to,
      act: 'triage',
      by: ['person', 'gate'] as Mover[],
    })),
    { from: ['open', 'investigating', 'fixed', 'not_a_defect', 'accepted_deviation'], to: 'accepted_deviation', act: 'accept with waiver', by: ['gate'] },
  ],
};

/** The move from `from` to `to` by `mover`, or why there is none. */
export function findMove<S extends string>(machine: StateMachine<S>, from: S, to: S, mover: Mover): { ok: true; act: string } | { ok: false; reason: string } {
  const candidates = machine.moves.filter((m) => m.to === to && m.from.includes(from));
  const move = candidates.find((m) => m.by.includes(mover));
  if (move) return { ok: true, act: move.act };
  const label = (s: string) => s.replace(/_/g, ' ');
  if (candidates.length > 0) {
    return { ok: false, reason: `A ${machine.name} becomes ${label(to)} only through the gate (${candidates.map((m) => m.act).join(', ')}), not by a direct change.` };
  }
  return { ok: false, reason: `A ${machine.name} that is ${label(from)} cannot become ${label(to)}.` };
}

/**
 * Moves `entity` to `to` when the machine allows it.
 * @throws ValidationError for a gate-only move asked by a person; ConflictError for a move the machine does not hold
 */
export function moveTo<S extends string>(machine: StateMachine<S>, entity: { state: S }, to: S, mover: Mover): void {
  const move = findMove(machine, entity.state, to, mover);
  if (!move.ok) {
    const gateOnly = machine.moves.some((m) => m.to === to && m.from.includes(entity.state));
    if (gateOnly) throw new ValidationError(move.reason, [{ path: 'body.state', message: move.reason }]);
    throw new ConflictError(move.reason);
  }
  entity.state = to;
}
