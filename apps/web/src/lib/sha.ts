/** Commit SHAs are shown to 7 hex digits (git's own default); full SHAs stay in links and copies. */
export const SHORT_SHA_LENGTH = 7;

export function shortSha(sha: string): string {
  return sha.slice(0, SHORT_SHA_LENGTH);
}
