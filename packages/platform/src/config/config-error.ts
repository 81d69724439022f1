/**
 * A configuration value is missing or wrong. Its message names the variable(s) and says what is
 * expected; it never repeats a secret's value. Entry points print it and exit 1 before starting.
 */
export class ConfigError extends Error {
  constructor(
    message: string,
    /** The variables at fault, for tests and for tools that point at them. */
    readonly variables: string[],
  ) {
    super(message);
    this.name = 'ConfigError';
  }
}
