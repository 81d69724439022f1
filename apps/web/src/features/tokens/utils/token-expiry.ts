/** How long a new CI token lives: the create form's choices. */
export const expiryChoices = ['never', '30', '90', '365', 'date'] as const;
export type ExpiryChoice = (typeof expiryChoices)[number];

export const expiryChoiceLabels: Record<ExpiryChoice, string> = {
  never: 'Never',
  '30': 'In 30 days',
  '90': 'In 90 days',
  '365': 'In 365 days',
  date: 'On a date…',
};

const DAY_MS = 86_400_000;

/** `YYYY-MM-DD` of a local calendar day, as `<input type="date">` reads and writes it. */
export function localDateInputValue(date: Date): string {
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${date.getFullYear()}-${pad(date.getMonth() + 1)}-${pad(date.getDate())}`;
}

/**
 * The instant a token made now with `choice` expires (ISO 8601), null for never, or an error
 * in words. A picked date means "usable through that whole day", so it ends at its local midnight.
 */
export function expiryInstant(choice: ExpiryChoice, pickedDate: string, now: Date): { expiresAt: string | null } | { error: string } {
  if (choice === 'never') return { expiresAt: null };
  if (choice !== 'date') return { expiresAt: new Date(now.getTime() + Number(choice) * DAY_MS).toISOString() };
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(pickedDate);
  if (!match) return { error: 'Pick the last day the token may be used.' };
  const endOfDay = new Date(Number(match[1]), Number(match[2]) - 1, Number(match[3]) + 1);
  if (Number.isNaN(endOfDay.getTime()) || endOfDay.getTime() <= now.getTime()) return { error: 'Pick today or a later day.' };
  return { expiresAt: endOfDay.toISOString() };
}

const relative = new Intl.RelativeTimeFormat(undefined, { numeric: 'always' });

/** The largest whole unit of a span: days from one day up, then hours, then minutes. */
function span(ms: number): [number, Intl.RelativeTimeFormatUnit] {
  const abs = Math.abs(ms);
  if (abs >= DAY_MS) return [Math.round(ms / DAY_MS), 'day'];
  if (abs >= 3_600_000) return [Math.round(ms / 3_600_000), 'hour'];
  return [Math.max(1, Math.round(abs / 60_000)) * (Math.sign(ms) || -1), 'minute'];
}

/**
 * The token list's word on expiry: "expires in 30 days", "expired 2 days ago", or null when the
 * token never expires. Days, not months, because a pipeline owner plans renewals by the day.
 */
export function describeExpiry(expiresAt: string | null, now: number = Date.now()): { expired: boolean; text: string } | null {
  if (!expiresAt) return null;
  const left = new Date(expiresAt).getTime() - now;
  const [value, unit] = span(left);
  return left > 0 ? { expired: false, text: `expires ${relative.format(value, unit)}` } : { expired: true, text: `expired ${relative.format(value, unit)}` };
}
