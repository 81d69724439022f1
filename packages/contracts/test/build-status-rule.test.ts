import { describe, expect, it } from 'vitest';
import { aggregateBuildStatus, aggregateVerdicts, captureStateOf, type CaptureState } from '../src/index.js';

// Captures by where they stand, named as the rule's table names them.
const queued: CaptureState = { status: 'queued', outcome: null };
const waiting: CaptureState = { status: 'done', outcome: null };
const analysing: CaptureState = { status: 'analysing', outcome: null };
const passed: CaptureState = { status: 'done', outcome: 'pass' };
const failed: CaptureState = { status: 'done', outcome: 'fail' };
const errorVerdict: CaptureState = { status: 'error', outcome: 'error' };
const analysisBroke: CaptureState = { status: 'error', outcome: null };
// Re-evaluation: the capture is analysed again while its previous verdict still stands.
const reanalysing: CaptureState = { status: 'analysing', outcome: 'fail' };

describe('aggregateBuildStatus (the table in its doc comment, row by row)', () => {
  it('no captures: pending', () => {
    expect(aggregateBuildStatus([])).toBe('pending');
  });

  it('any capture waiting without a verdict: pending, whatever the others say', () => {
    expect(aggregateBuildStatus([queued])).toBe('pending');
    expect(aggregateBuildStatus([passed, waiting])).toBe('pending');
    expect(aggregateBuildStatus([failed, errorVerdict, queued])).toBe('pending');
    // Waiting outranks being analysed: the build has not even been picked up in full.
    expect(aggregateBuildStatus([analysing, queued])).toBe('pending');
  });

  it('any capture being analysed (none waiting): running', () => {
    expect(aggregateBuildStatus([analysing])).toBe('running');
    expect(aggregateBuildStatus([passed, failed, errorVerdict, analysing])).toBe('running');
    expect(aggregateBuildStatus([reanalysing, passed])).toBe('running');
  });

  it('any error, as a verdict or as a broken analysis without one: error', () => {
    expect(aggregateBuildStatus([errorVerdict])).toBe('error');
    expect(aggregateBuildStatus([passed, errorVerdict])).toBe('error');
    expect(aggregateBuildStatus([analysisBroke])).toBe('error');
    expect(aggregateBuildStatus([passed, analysisBroke])).toBe('error');
  });

  it('any fail (no error): fail', () => {
    expect(aggregateBuildStatus([failed])).toBe('fail');
    expect(aggregateBuildStatus([passed, failed, passed])).toBe('fail');
  });

  it('every capture pass: pass', () => {
    expect(aggregateBuildStatus([passed])).toBe('pass');
    expect(aggregateBuildStatus([passed, passed, passed])).toBe('pass');
  });

  it('an error outranks a failure: one failing and one erroring capture make an error build', () => {
    // The bug: the old rule ranked fail first, so the dashboard said Fail while the CLI exited 2.
    expect(aggregateBuildStatus([failed, errorVerdict])).toBe('error');
    expect(aggregateBuildStatus([errorVerdict, failed])).toBe('error');
    expect(aggregateBuildStatus([failed, passed, analysisBroke])).toBe('error');
  });
});

describe('aggregateVerdicts (captures that all hold a verdict)', () => {
  it('ranks error above fail above pass', () => {
    expect(aggregateVerdicts(['pass', 'pass'])).toBe('pass');
    expect(aggregateVerdicts(['pass', 'fail'])).toBe('fail');
    expect(aggregateVerdicts(['fail', 'error', 'pass'])).toBe('error');
  });

  it('refuses an empty list, which has no judged outcome', () => {
    expect(() => aggregateVerdicts([])).toThrow('aggregateVerdicts needs at least one verdict');
  });
});

describe('captureStateOf (a capture as the API sends it)', () => {
  const verdict = (outcome: 'pass' | 'fail' | 'error') => ({ outcome, reason: null, engineVersion: 'x', maskRevisionId: null, maskRevision: null, createdAt: '2026-12-01T00:00:00.000Z', checks: [] });

  it('takes the status and the newest verdict, so the rule reads API captures like stored ones', () => {
    expect(captureStateOf({ status: 'queued', verdict: null })).toEqual({ status: 'queued', outcome: null });
    expect(captureStateOf({ status: 'done', verdict: verdict('fail') })).toEqual({ status: 'done', outcome: 'fail' });
    expect(aggregateBuildStatus([captureStateOf({ status: 'done', verdict: verdict('fail') }), captureStateOf({ status: 'error', verdict: null })])).toBe('error');
  });
});
