// Numbers in mail come from @earmark/contracts' formatter (describeCheckValues, formatMargin…), as on every surface.

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
