import { CHECK_KIND_LABELS } from './mask-diff-words.js';
import { formatMarginAt } from './format/quantities.js';
import type { CheckKind } from './masks.js';

/** What a finding's title is rendered from: the check's identity and its newest numbers. */
export interface FindingTitleParts {
  checkId: string;
  checkKind?: string | null;
  checkLabel?: string | null;
  margin: number | null;
  unit: string | null;
  worstHz: number | null;
}

/**
 * A finding's title for people, rendered from structured fields on every read (stored titles keep
 * the wording of the day they were written): "Passband (magnitude envelope): −0.83 dB at 7.99 kHz",
 * "Level: −1.20 dB", or "Timing: not measurable" when the check has no margin.
 */
export function findingTitle(parts: FindingTitleParts): string {
  const where = parts.margin === null ? 'not measurable' : formatMarginAt(parts.margin, parts.unit, parts.worstHz);
  return `${findingCheckName(parts)}: ${where}`;
}

/** The failing check in words: "Passband (magnitude envelope)", "Level", or its id when nothing else is known. */
export function findingCheckName(parts: Pick<FindingTitleParts, 'checkId' | 'checkKind' | 'checkLabel'>): string {
  const kind = parts.checkKind ? (CHECK_KIND_LABELS[parts.checkKind as CheckKind] ?? parts.checkKind) : null;
  const label = parts.checkLabel?.trim() || null;
  return label && kind && label.toLowerCase() !== kind.toLowerCase() ? `${label} (${kind.toLowerCase()})` : (label ?? kind ?? parts.checkId);
}
