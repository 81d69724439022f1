import { createHash } from 'node:crypto';

/** A strong validator of a JSON answer: the SHA-256 of its serialisation, shortened. */
export function etagOf(body: unknown): string {
  return `"${createHash('sha256').update(JSON.stringify(body)).digest('base64url').slice(0, 27)}"`;
}

/** RFC 9110 §13.1.2: `*` or any listed tag, compared weakly (a `W/` prefix is ignored). */
export function matchesIfNoneMatch(header: string | undefined, etag: string): boolean {
  if (!header) return false;
  if (header.trim() === '*') return true;
  const bare = (tag: string) => tag.trim().replace(/^W\//, '');
  return header.split(',').some((tag) => bare(tag) === bare(etag));
}
