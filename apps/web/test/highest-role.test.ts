import { describe, expect, it } from 'vitest';
import { highestRole } from '@/features/auth/utils/highest-role';
import { qaUser } from './mock-api';

describe('highestRole', () => {
  it('is admin for global admins whatever their memberships', () => {
    expect(highestRole({ ...qaUser, isAdmin: true })).toBe('admin');
  });

  it('is the most privileged membership otherwise', () => {
    expect(highestRole(qaUser)).toBe('qa_manager');
    expect(
      highestRole({
        ...qaUser,
        memberships: [
          { projectKey: 'a-b', projectName: 'A', role: 'viewer' },
          { projectKey: 'c-d', projectName: 'C', role: 'engineer' },
        ],
      }),
    ).toBe('engineer');
  });

  it('is null without memberships', () => {
    expect(highestRole({ ...qaUser, memberships: [] })).toBeNull();
  });
});
