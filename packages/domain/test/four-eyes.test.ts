import { describe, expect, it } from 'vitest';
import { ForbiddenError } from '../src/errors.js';
import {
  assertMayDecide,
  assertMayEditDraft,
  assertMaySubmit,
  contributorsOf,
  maskUnderReview,
  waiverUnderReview,
  withContributor,
} from '../src/rules/four-eyes.js';

const eli = { id: 'u-eli', email: 'eli@example.test' };
const quinn = { id: 'u-quinn', email: 'quinn@example.test' };
const ada = { id: 'u-ada', email: 'ada@example.test' };

/** The error a call throws, so its class and message can both be asserted. */
function thrown(fn: () => void): Error {
  try {
    fn();
  } catch (error) {
    return error as Error;
  }
  throw new Error('expected the call to throw');
}

describe('editing and submitting a draft', () => {
  const draft = { revision: 4, author: eli };

  it('lets the author edit and submit', () => {
    expect(() => assertMayEditDraft(draft, eli)).not.toThrow();
    expect(() => assertMaySubmit(draft, eli)).not.toThrow();
  });

  it('refuses anyone else an edit, says why and points to a copy of their own', () => {
    const error = thrown(() => assertMayEditDraft(draft, quinn));
    expect(error).toBeInstanceOf(ForbiddenError);
    expect(error.message).toBe('Only the author of revision 4 (eli@example.test) may change it; copy the revision to a draft of your own to propose other limits.');
  });

  it('refuses anyone else the submission, says why and points to a copy of their own', () => {
    const error = thrown(() => assertMaySubmit(draft, quinn));
    expect(error).toBeInstanceOf(ForbiddenError);
    expect(error.message).toBe('Only the author of revision 4 (eli@example.test) may submit it for review; copy the revision to a draft of your own to submit your version.');
  });
});

describe('deciding a mask revision', () => {
  it('lets someone who neither wrote nor edited it approve or reject', () => {
    const mask = maskUnderReview({ revision: 7, author: eli, contributors: [eli.id] });
    expect(() => assertMayDecide(mask, quinn, 'approved')).not.toThrow();
    expect(() => assertMayDecide(mask, quinn, 'rejected')).not.toThrow();
  });

  it('refuses the author', () => {
    const error = thrown(() => assertMayDecide(maskUnderReview({ revision: 7, author: eli, contributors: [eli.id] }), eli, 'approved'));
    expect(error).toBeInstanceOf(ForbiddenError);
    expect(error.message).toBe('A mask revision must be approved by someone who neither wrote nor edited it: eli@example.test wrote revision 7. Someone else must review it.');
  });

  it('refuses the author even when the recorded contributors leave them out (rows made before contributors were kept)', () => {
    const error = thrown(() => assertMayDecide(maskUnderReview({ revision: 2, author: eli, contributors: [] }), eli, 'rejected'));
    expect(error.message).toBe('A mask revision must be rejected by someone who neither wrote nor edited it: eli@example.test wrote revision 2. Someone else must review it.');
  });

  it('refuses anyone who edited any version of it, and only them', () => {
    const mask = maskUnderReview({ revision: 9, author: eli, contributors: [eli.id, quinn.id] });
    const error = thrown(() => assertMayDecide(mask, quinn, 'approved'));
    expect(error).toBeInstanceOf(ForbiddenError);
    expect(error.message).toBe('A mask revision must be approved by someone who neither wrote nor edited it: quinn@example.test edited revision 9. Someone else must review it.');
    expect(() => assertMayDecide(mask, ada, 'approved')).not.toThrow();
  });
});

describe('deciding a waiver', () => {
  it('refuses the requester and says who must decide', () => {
    const error = thrown(() => assertMayDecide(waiverUnderReview({ requestedBy: eli }), eli, 'approved'));
    expect(error).toBeInstanceOf(ForbiddenError);
    expect(error.message).toBe('A waiver must be approved by someone who neither requested nor edited it: eli@example.test requested it. Someone else must decide it.');
    expect(() => assertMayDecide(waiverUnderReview({ requestedBy: eli }), quinn, 'rejected')).not.toThrow();
  });

  it('refuses anyone who edited the request', () => {
    const error = thrown(() => assertMayDecide(waiverUnderReview({ requestedBy: eli }, [quinn.id]), quinn, 'rejected'));
    expect(error.message).toBe('A waiver must be rejected by someone who neither requested nor edited it: quinn@example.test edited it. Someone else must decide it.');
    expect(() => assertMayDecide(waiverUnderReview({ requestedBy: eli }, [quinn.id]), ada, 'approved')).not.toThrow();
  });
});

describe('the contributor record', () => {
  it('puts the author first and names everyone once', () => {
    expect(contributorsOf({ author: eli, contributors: [quinn.id, eli.id, quinn.id] })).toEqual([eli.id, quinn.id]);
    expect(contributorsOf({ author: eli, contributors: [] })).toEqual([eli.id]);
  });

  it('appends an editor once, keeping the order', () => {
    expect(withContributor([eli.id], quinn)).toEqual([eli.id, quinn.id]);
    expect(withContributor([eli.id, quinn.id], eli)).toEqual([eli.id, quinn.id]);
    const before = [eli.id];
    withContributor(before, ada);
    expect(before).toEqual([eli.id]); // a new list: the entity's array is replaced, so the change is tracked
  });
});
