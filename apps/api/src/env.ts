import path from 'node:path';
import { fileURLToPath } from 'node:url';
import {
  SHARED_SECRETS,
  checkObjectStoreVars,
  databaseVars,
  loadConfig,
  loggingVars,
  objectStoreVars,
  processVars,
  publicUrlVars,
  type EnvRecord,
  type RuntimeMode,
} from '@earmark/platform';
import { z } from 'zod';

const defaultWebDist = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../web/dist');

const apiVars = {
  EARMARK_JWT_SECRET: z.string().min(32, 'must be at least 32 characters'),
  EARMARK_API_HOST: z.string().default('127.0.0.1'),
  EARMARK_API_PORT: z.coerce.number().int().min(0).max(65535).default(4310),
  /** Folder of the built web app; served at / when it exists. */
  EARMARK_WEB_DIST: z.string().default(defaultWebDist),
  EARMARK_ACCESS_TOKEN_TTL_S: z.coerce.number().int().min(30).default(900),
  EARMARK_REFRESH_TOKEN_TTL_S: z.coerce.number().int().min(60).default(7 * 24 * 3600),
  /** Failed sign-in attempts per address and e-mail in a 15-minute window. */
  EARMARK_LOGIN_RATE_LIMIT: z.coerce.number().int().min(1).default(10),
  /** Failed sign-in attempts per address (any e-mail) in a 15-minute window. */
  EARMARK_LOGIN_RATE_LIMIT_PER_ADDRESS: z.coerce.number().int().min(1).default(50),
  /** Failed sign-in attempts per e-mail (any address) in a 15-minute window. */
  EARMARK_LOGIN_RATE_LIMIT_PER_EMAIL: z.coerce.number().int().min(1).default(50),
  /** Sign-in attempts per minute across everyone, successful or not. */
  EARMARK_LOGIN_GLOBAL_PER_MINUTE: z.coerce.number().int().min(1).default(300),
  /** Password checks (bcrypt) running at once, and how many more sign-ins may wait for one. */
  EARMARK_PASSWORD_WORK_CONCURRENCY: z.coerce.number().int().min(1).default(2),
  EARMARK_PASSWORD_WORK_QUEUE: z.coerce.number().int().min(0).default(8),
  /**
   * Express `trust proxy`: unset = false (X-Forwarded-For ignored). Set it only behind a proxy:
   * `true`, a hop count, or names/CIDRs such as `loopback` or `10.0.0.0/8,loopback`.
   */
  EARMARK_TRUST_PROXY: z
    .string()
    .trim()
    .optional()
    .transform((v): boolean | number | string => {
      if (v === undefined || v === '' || v === 'false') return false;
      if (v === 'true') return true;
      return /^\d+$/.test(v) ? Number(v) : v;
    }),
  /** Requests held at once by `GET /api/v1/captures/:id?wait=N` (per process); beyond it they answer at once. */
  EARMARK_VERDICT_WAIT_MAX_HELD: z.coerce.number().int().min(0).default(1000),
  /** Largest capture upload accepted. */
  EARMARK_MAX_CAPTURE_BYTES: z.coerce.number().int().min(1024).default(64 * 1024 * 1024),
  /**
   * Storage quota of projects without their own: bytes of stored capture audio, past which uploads
   * answer 413; 0 = unlimited. An administrator sets a project's own (PATCH /api/projects/:project).
   */
  EARMARK_PROJECT_QUOTA_BYTES: z.coerce.number().int().min(0).default(0),
  /** Capture uploads read and decoded at once by this process; past it, 503 with Retry-After before the body is read. */
  EARMARK_MAX_CONCURRENT_UPLOADS: z.coerce.number().int().min(1).default(8),
  /** Compute threads of the API (decoding, plots, WAV rendering): the CPU heavy requests may take. */
  EARMARK_API_COMPUTE_THREADS: z.coerce.number().int().min(1).default(1),
  /** Tasks that may wait for a compute thread; past it, 503 with Retry-After. */
  EARMARK_API_COMPUTE_QUEUE: z.coerce.number().int().min(0).default(16),
  /**
   * V8 heap limit per compute thread (MB). A capture at the decoded-sample limit (2^25 samples) is
   * decoded and plotted within it (docs/architecture.md, "Compute threads"); a task that outgrows
   * it ends only its thread.
   */
  EARMARK_API_COMPUTE_MEMORY_MB: z.coerce.number().int().min(64).default(1536),
  /** Decoded samples a plot other than the worker-drawn default may be drawn from on the API (packages/domain views-tasks.ts). */
  EARMARK_API_PLOT_MAX_SAMPLES: z.coerce.number().int().min(48_000).default(2 ** 22),
};

function apiSchema(mode: RuntimeMode) {
  return z
    .object({
      ...databaseVars,
      ...objectStoreVars(mode),
      ...publicUrlVars(mode),
      ...loggingVars,
      ...processVars(mode === 'production' ? 9464 : undefined),
      ...apiVars,
    })
    .superRefine(checkObjectStoreVars);
}
export type ApiEnv = z.infer<ReturnType<typeof apiSchema>> & { EARMARK_MODE: RuntimeMode };

export const API_SECRETS = [...SHARED_SECRETS, 'EARMARK_JWT_SECRET'] as const;

/**
 * The only place the API reads its configuration: the environment, the optional env file
 * (EARMARK_ENV_FILE) and secret files (`NAME_FILE`). A wrong or missing value throws a
 * ConfigError naming the variable.
 */
export function loadApiEnv(env: EnvRecord = process.env): ApiEnv {
  return loadConfig(apiSchema, env, { processName: 'API', secrets: API_SECRETS });
}
