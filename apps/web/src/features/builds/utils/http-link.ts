/**
 * The URL if it is http(s), else null. The API refuses other schemes, but builds stored before
 * that rule (or a misbehaving server) must still never become a `javascript:` or `data:` link.
 */
export function httpLinkOrNull(value: string | null | undefined): string | null {
  if (!value) return null;
  try {
    const url = new URL(value);
    return url.protocol === 'http:' || url.protocol === 'https:' ? url.href : null;
  } catch {
    return null;
  }
}
