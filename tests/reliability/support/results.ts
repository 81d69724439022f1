import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { z } from 'zod';
import { reliability } from './mode.js';

/** One measured figure: what it is, its value and unit, and the target it is held to (if any). */
export const Figure = z.object({
  part: z.string(),
  name: z.string(),
  value: z.number().nullable(),
  unit: z.string(),
  /** `max`: the value must be at most `target`; `min`: at least; absent: reported only. */
  target: z.object({ kind: z.enum(['max', 'min']), value: z.number() }).optional(),
  note: z.string().optional(),
});
export type Figure = z.infer<typeof Figure>;

export const resultsDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../.data/reliability', reliability.mode);

/**
 * Figures are appended to one JSON-lines file per part (vitest runs files in separate workers,
 * and the reporter reads them all afterwards). Quick and full runs keep separate folders.
 */
export function recordFigures(part: string, figures: Omit<Figure, 'part'>[]): void {
  fs.mkdirSync(resultsDir, { recursive: true });
  const lines = figures.map((f) => JSON.stringify(Figure.parse({ part, ...f }))).join('\n');
  fs.appendFileSync(path.join(resultsDir, `${part}.jsonl`), `${lines}\n`);
}

/** Clears earlier figures of a part, once at the start of its file. */
export function resetFigures(part: string): void {
  fs.rmSync(path.join(resultsDir, `${part}.jsonl`), { force: true });
}

export function readFigures(dir = resultsDir): Figure[] {
  if (!fs.existsSync(dir)) return [];
  return fs
    .readdirSync(dir)
    .filter((f) => f.endsWith('.jsonl'))
    .sort()
    .flatMap((f) => fs.readFileSync(path.join(dir, f), 'utf8').split('\n').filter(Boolean).map((l) => Figure.parse(JSON.parse(l))));
}
