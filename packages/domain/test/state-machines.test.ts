import { describe, expect, it } from 'vitest';
import { ConflictError, ValidationError } from '../src/errors.js';
import { FINDING, MASK_REVISION, WAIVER, findMove, moveTo } from '../src/rules/state-machines.js';

describe('state machines of the gate', () => {
  it('a mask revision goes draft → in review → approved → superseded, and never back', () => {
    const mask = { state: 'draft' as const } as { state: Parameters<typeof moveTo>[1]['state'] };
    moveTo(MASK_REVISION, mask as never, 'in_review', 'person');
    moveTo(MASK_REVISION, mask as never, 'approved', 'person');
    expect(mask.state).toBe('approved');
    expect(() => moveTo(MASK_REVISION, mask as never, 'draft', 'person')).toThrow(ConflictError);
    // Superseding is the gate's act when the next revision is approved, never a person's.
    expect(() => moveTo(MASK_REVISION, mask as never, 'superseded', 'person')).toThrow(ValidationError);
    moveTo(MASK_REVISION, mask as never, 'superseded', 'gate');
    expect(mask.state).toBe('superseded');
  });

  it('a draft cannot be approved without being submitted', () => {
    expect(findMove(MASK_REVISION, 'draft', 'approved', 'person')).toEqual({ ok: false, reason: 'A mask revision that is draft cannot become approved.' });
  });

  it('a finding becomes an accepted deviation only through the gate (an approved waiver)', () => {
    const finding = { state: 'investigating' as 'investigating' | 'accepted_deviation' | 'open' };
    expect(() => moveTo(FINDING, finding as never, 'accepted_deviation', 'person')).toThrow(/only through the gate \(accept with waiver\)/);
    expect(finding.state).toBe('investigating');
    moveTo(FINDING, finding as never, 'accepted_deviation', 'gate');
    // The gate re-opens it when the waiver ends; people may triage it on once it is fixed.
    moveTo(FINDING, finding as never, 'open', 'gate');
    expect(finding.state).toBe('open');
    moveTo(FINDING, finding as never, 'accepted_deviation', 'gate');
    moveTo(FINDING, finding as never, 'fixed', 'person');
    expect(finding.state).toBe('fixed');
  });

  it('people triage findings freely among the other states', () => {
    for (const from of ['open', 'investigating', 'fixed', 'not_a_defect'] as const) {
      for (const to of ['open', 'investigating', 'fixed', 'not_a_defect'] as const) expect(findMove(FINDING, from, to, 'person').ok).toBe(true);
    }
  });

  it('a waiver is decided once; only an approved one expires (the gate) or is revoked (a person)', () => {
    expect(findMove(WAIVER, 'requested', 'approved', 'person').ok).toBe(true);
    expect(findMove(WAIVER, 'rejected', 'approved', 'person').ok).toBe(false);
    expect(findMove(WAIVER, 'approved', 'revoked', 'person').ok).toBe(true);
    expect(findMove(WAIVER, 'requested', 'revoked', 'person').ok).toBe(false);
    expect(findMove(WAIVER, 'approved', 'expired', 'person').ok).toBe(false);
    expect(findMove(WAIVER, 'approved', 'expired', 'gate').ok).toBe(true);
    expect(findMove(WAIVER, 'expired', 'approved', 'gate').ok).toBe(false);
  });
});
