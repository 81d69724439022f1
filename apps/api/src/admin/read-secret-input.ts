import fs from 'node:fs';

/**
 * A password for a command line tool, never from its arguments (they show in `ps` and shell
 * history): from a file (`--password-file`, `-` for stdin) or from stdin; the final newline is dropped.
 */
export async function readSecretInput(file: string | undefined, stdin: NodeJS.ReadStream = process.stdin): Promise<string> {
  if (file && file !== '-') return fs.readFileSync(file, 'utf8').replace(/\r?\n$/, '');
  if (stdin.isTTY) throw new Error('give the password on stdin (e.g. from a password manager or `< file`) or with --password-file; it is not read from an interactive terminal, where it would echo');
  const chunks: Buffer[] = [];
  for await (const chunk of stdin) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks).toString('utf8').replace(/\r?\n$/, '');
}
