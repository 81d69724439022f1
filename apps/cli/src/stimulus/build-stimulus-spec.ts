import { StimulusSpec } from '@earmark/contracts';
import type { z } from 'zod';
import { FLAG_TO_FIELD, type StimulusFlags } from './stimulus-options.js';

/** Sample rate used when neither the spec file nor --rate gives one. */
export const DEFAULT_RATE = 48000;

/** A spec that did not validate: one line naming each offending field. */
export class StimulusSpecError extends Error {
  override readonly name = 'StimulusSpecError';
}

function toNumber(text: string): number {
  // Number('') is 0; an empty flag must fail validation instead.
  return text.trim() === '' ? Number.NaN : Number(text);
}

/** One line from zod issues: `field: message; field: message`. */
export function describeIssues(issues: readonly z.core.$ZodIssue[]): string {
  return issues.map((i) => (i.path.length > 0 ? `${i.path.join('.')}: ${i.message}` : i.message)).join('; ');
}

/**
 * Merges a spec file's JSON (if any) with the flags given on the command line (flags win),
 * fills the default rate, and validates with the shared zod schema.
 *
 * @throws StimulusSpecError naming the invalid fields.
 */
export function buildStimulusSpec(fileJson: unknown, flags: StimulusFlags, given: (flag: keyof StimulusFlags) => boolean): StimulusSpec {
  if (fileJson !== undefined && (typeof fileJson !== 'object' || fileJson === null || Array.isArray(fileJson))) {
    throw new StimulusSpecError('invalid stimulus spec: the spec file must hold one JSON object');
  }
  const raw: Record<string, unknown> = { ...(fileJson as Record<string, unknown> | undefined) };
  for (const [flag, field, type] of FLAG_TO_FIELD) {
    const value = flags[flag];
    if (value === undefined || !given(flag)) continue;
    if (type === 'boolean') raw[field] = value === true;
    else if (typeof value !== 'string') continue;
    else if (type === 'number') raw[field] = toNumber(value);
    else if (type === 'numbers') raw[field] = value.split(',').map(toNumber);
    else raw[field] = value;
  }
  if (raw.sampleRate === undefined) raw.sampleRate = DEFAULT_RATE;
  const parsed = StimulusSpec.safeParse(raw);
  if (!parsed.success) throw new StimulusSpecError(`invalid stimulus spec: ${describeIssues(parsed.error.issues)}`);
  return parsed.data;
}
