import { z } from 'zod';

// The start and test commands' configuration; every variable has a working default.
const Settings = z.object({
  EARMARK_PG_PORT: z.coerce.number().int().min(1024).max(65535).default(54329),
  EARMARK_TEST_PG_PORT: z.coerce.number().int().min(1024).max(65535).default(54339),
  EARMARK_API_PORT: z.coerce.number().int().min(1024).max(65535).default(4310),
  EARMARK_TEST_API_PORT: z.coerce.number().int().min(1024).max(65535).default(4390),
  EARMARK_S3_PORT: z.coerce.number().int().min(1024).max(65535).default(4312),
  EARMARK_SMTP_PORT: z.coerce.number().int().min(1024).max(65535).default(4325),
  EARMARK_INBOX_PORT: z.coerce.number().int().min(1024).max(65535).default(4326),
  EARMARK_DB_NAME: z.string().regex(/^[a-z_][a-z0-9_]*$/).default('earmark'),
  /** Defaults to a secret generated once under .data/secrets.json. */
  EARMARK_JWT_SECRET: z.string().min(32).optional(),
  EARMARK_ANALYSIS_SLOTS: z.coerce.number().int().min(1).max(64).optional(),
  EARMARK_LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
});
export type Settings = z.infer<typeof Settings>;

export function loadSettings(env: NodeJS.ProcessEnv = process.env): Settings {
  const parsed = Settings.safeParse(env);
  if (!parsed.success) {
    const issues = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
    throw new Error(`Invalid environment: ${issues}`);
  }
  return parsed.data;
}
