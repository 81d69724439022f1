import { z } from 'zod';

// CI systems often define a secret as an empty string when it is missing: treat that as unset.
const optionalText = z
  .string()
  .optional()
  .transform((v) => (v === undefined || v.trim() === '' ? undefined : v.trim()));

const SubmitEnv = z.object({ EARMARK_URL: optionalText, EARMARK_TOKEN: optionalText });
export type SubmitEnv = z.infer<typeof SubmitEnv>;

/**
 * The CLI's only reader of the environment: the server URL and API token a pipeline keeps
 * as secrets. Flags win over these (see submit-options.ts).
 */
export function readSubmitEnv(env: NodeJS.ProcessEnv = process.env): SubmitEnv {
  return SubmitEnv.parse({ EARMARK_URL: env['EARMARK_URL'], EARMARK_TOKEN: env['EARMARK_TOKEN'] });
}
