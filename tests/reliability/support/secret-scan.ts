/** Secrets (each at least 8 characters) found verbatim in `output`, named by `label`. */
export function leakedSecrets(output: string, secrets: Record<string, string>): string[] {
  return Object.entries(secrets)
    .filter(([, value]) => value.length >= 8 && output.includes(value))
    .map(([label]) => label);
}
