import { ConflictError } from '../errors.js';

/**
 * The workspace always keeps one administrator who can sign in: otherwise nobody could invite,
 * reset or repair anything except through the server's command line.
 * @param activeAdmins active (not disabled) administrators now, the target included
 * @throws ConflictError when the change would leave none
 */
export function assertKeepsAnAdmin(target: { isAdmin: boolean; disabled: boolean; email: string }, change: { disabled?: boolean; isAdmin?: boolean }, activeAdmins: number): void {
  const countsNow = target.isAdmin && !target.disabled;
  const countsAfter = (change.isAdmin ?? target.isAdmin) && !(change.disabled ?? target.disabled);
  if (countsNow && !countsAfter && activeAdmins <= 1) {
    throw new ConflictError(`${target.email} is the last active administrator; make another person an administrator first.`, { code: 'last-admin' });
  }
}

/**
 * A project keeps one QA manager: without one nobody in it may approve masks or decide waivers.
 * @param qaManagers the project's QA managers now, the member included
 * @throws ConflictError when removing or demoting the member would leave none
 */
export function assertKeepsAQaManager(member: { role: string; email: string }, nextRole: string | null, qaManagers: number, projectKey: string): void {
  if (member.role === 'qa_manager' && nextRole !== 'qa_manager' && qaManagers <= 1) {
    throw new ConflictError(`${member.email} is the last QA manager of ${projectKey}; make another member QA manager first, so masks and waivers can still be decided.`, { code: 'last-qa-manager' });
  }
}
