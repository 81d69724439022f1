/**
 * The password thread: bcrypt (cost 12, a few hundred ms) runs here, never on the event loop
 * that answers requests. Imports only the password module, not the ORM. Loaded by
 * `createComputePool` (packages/platform) through password-checks.ts.
 */
import { verifyPassword } from '@earmark/db/passwords';
import { defineComputeTasks } from '@earmark/platform';

export const { verify } = defineComputeTasks({
  verify: (input: { password: string; hash: string }) => verifyPassword(input.password, input.hash),
});
