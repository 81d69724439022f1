import { describe, expect, it } from 'vitest';
import { ConflictError } from '../src/errors.js';
import { assertKeepsAQaManager, assertKeepsAnAdmin } from '../src/rules/last-admin.js';

const admin = { isAdmin: true, disabled: false, email: 'ada@example.test' };

describe('the workspace keeps an active administrator', () => {
  it('refuses to disable or demote the only active administrator, in words', () => {
    expect(() => assertKeepsAnAdmin(admin, { disabled: true }, 1)).toThrow('ada@example.test is the last active administrator; make another person an administrator first.');
    expect(() => assertKeepsAnAdmin(admin, { isAdmin: false }, 1)).toThrow(ConflictError);
  });

  it('allows it when another active administrator remains, and any change that keeps the count', () => {
    expect(() => assertKeepsAnAdmin(admin, { disabled: true }, 2)).not.toThrow();
    expect(() => assertKeepsAnAdmin(admin, { disabled: false, isAdmin: true }, 1)).not.toThrow();
    // A disabled administrator does not count now, so enabling or demoting one changes nothing.
    expect(() => assertKeepsAnAdmin({ ...admin, disabled: true }, { isAdmin: false }, 0)).not.toThrow();
    expect(() => assertKeepsAnAdmin({ ...admin, isAdmin: false }, { disabled: true }, 1)).not.toThrow();
  });
});

describe('a project keeps a QA manager', () => {
  const qa = { role: 'qa_manager', email: 'qa@example.test' };
  it('refuses to demote or remove the last one', () => {
    expect(() => assertKeepsAQaManager(qa, 'engineer', 1, 'alpha-dsp')).toThrow(/qa@example.test is the last QA manager of alpha-dsp/);
    expect(() => assertKeepsAQaManager(qa, null, 1, 'alpha-dsp')).toThrow(ConflictError);
  });
  it('allows it with a second QA manager, or for other roles', () => {
    expect(() => assertKeepsAQaManager(qa, null, 2, 'alpha-dsp')).not.toThrow();
    expect(() => assertKeepsAQaManager(qa, 'qa_manager', 1, 'alpha-dsp')).not.toThrow();
    expect(() => assertKeepsAQaManager({ role: 'engineer', email: 'e@example.test' }, null, 1, 'alpha-dsp')).not.toThrow();
  });
});
