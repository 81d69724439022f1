import { ConnectionException } from '@mikro-orm/core';
import { describe, expect, it } from 'vitest';
import { isDatabaseUnavailable } from '../src/http/database-unavailable.js';

// The whole path (uploads during a database restart answer 503 with Retry-After, then succeed on
// retry) is tested against real processes in tests/reliability/faults.test.ts.
describe('isDatabaseUnavailable', () => {
  it('recognises connection failures, directly or as the cause of a wrapped error', () => {
    expect(isDatabaseUnavailable(new ConnectionException(new Error('connect ECONNREFUSED 127.0.0.1:5432')))).toBe(true);
    expect(isDatabaseUnavailable(Object.assign(new Error('connect ECONNREFUSED'), { code: 'ECONNREFUSED' }))).toBe(true);
    expect(isDatabaseUnavailable(Object.assign(new Error('terminating connection due to administrator command'), { code: '57P01' }))).toBe(true);
    expect(isDatabaseUnavailable(new Error('Connection terminated unexpectedly'))).toBe(true);
    expect(isDatabaseUnavailable(new Error('query failed', { cause: new Error('Knex: Timeout acquiring a connection. The pool is probably full.') }))).toBe(true);
  });

  it('leaves every other error to the generic 500', () => {
    expect(isDatabaseUnavailable(Object.assign(new Error('duplicate key value violates unique constraint'), { code: '23505' }))).toBe(false);
    expect(isDatabaseUnavailable(new TypeError("Cannot read properties of undefined (reading 'id')"))).toBe(false);
    expect(isDatabaseUnavailable(undefined)).toBe(false);
  });
});
