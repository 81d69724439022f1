import { z } from 'zod';

/**
 * `quick` (inside `npm test`: small sizes, no figure targets asserted) or `full`
 * (`npm run test:reliability`). Sizes can be overridden one by one for a longer or shorter run.
 */
const Settings = z.object({
  EARMARK_RELIABILITY_MODE: z.enum(['quick', 'full']).default('quick'),
  EARMARK_LOAD_CLIENTS: z.coerce.number().int().min(1).optional(),
  EARMARK_LOAD_SECONDS: z.coerce.number().min(1).optional(),
  EARMARK_LOAD_WORKERS: z.coerce.number().int().min(1).optional(),
  EARMARK_SOAK_CAPTURES: z.coerce.number().int().min(1).optional(),
  EARMARK_SOAK_BUILDS: z.coerce.number().int().min(1).optional(),
  EARMARK_FUZZ_DECODER_RUNS: z.coerce.number().int().min(1).optional(),
  EARMARK_FUZZ_UPLOAD_RUNS: z.coerce.number().int().min(1).optional(),
});

const s = Settings.parse(process.env);
const full = s.EARMARK_RELIABILITY_MODE === 'full';

export const reliability = {
  mode: s.EARMARK_RELIABILITY_MODE,
  full,
  load: { clients: s.EARMARK_LOAD_CLIENTS ?? (full ? 20 : 2), seconds: s.EARMARK_LOAD_SECONDS ?? (full ? 60 : 5), workers: s.EARMARK_LOAD_WORKERS ?? 1 },
  soak: { captures: s.EARMARK_SOAK_CAPTURES ?? (full ? 5000 : 40), builds: s.EARMARK_SOAK_BUILDS ?? (full ? 200 : 8) },
  fuzz: { decoderRuns: s.EARMARK_FUZZ_DECODER_RUNS ?? (full ? 2000 : 300), uploadRuns: s.EARMARK_FUZZ_UPLOAD_RUNS ?? (full ? 300 : 40) },
} as const;

/** The sizes of this run in words, for the report. */
export function describeSizes(): string {
  const { load, soak, fuzz } = reliability;
  return `load ${load.clients} clients × ${load.seconds} s; soak ${soak.captures} captures over ${soak.builds} builds; fuzz ${fuzz.decoderRuns} WAVs through the decoder, ${fuzz.uploadRuns} through the upload route`;
}
