/** How numbers, frequencies and dates read in mail: four significant digits, a real minus sign. */
export function formatNumber(value: number): string {
  const n = Number(value.toPrecision(4));
  return n < 0 ? `\u2212${String(-n)}` : String(n);
}

export const withUnit = (value: number, unit: string | null) => `${formatNumber(value)}${unit ? ` ${unit}` : ''}`;

/** Frequencies in Hz, as measured (8021.7 → "8022 Hz"). */
export const formatHz = (hz: number) => `${Number(hz.toPrecision(4))} Hz`;

/** A date as YYYY-MM-DD (UTC). */
export const formatDay = (at: Date | string) => (typeof at === 'string' ? new Date(at) : at).toISOString().slice(0, 10);

/** A check as people know it: its mask label with the id, or the id alone. */
export const checkName = (id: string, label: string | null) => (label ? `${label} (${id})` : id);

export const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/** "abc1234 on main (rc2)": a build as the mail names it. */
export const buildName = (b: { sha: string; branch: string | null; label: string | null }) =>
  `${b.sha}${b.branch ? ` on ${b.branch}` : ''}${b.label ? ` (${b.label})` : ''}`;

/** "Name (email)": who did something. */
export const personName = (p: { displayName: string; email: string }) => `${p.displayName} (${p.email})`;
