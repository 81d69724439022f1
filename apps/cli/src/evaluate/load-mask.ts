import { readFile } from 'node:fs/promises';
import { MaskDocument } from '@earmark/contracts';

/**
 * Reads a mask file (JSON, contracts' MaskDocument) and validates it; every failure becomes one
 * line naming the file and, for a schema problem, the path inside it (`checks.2.upper.1.hz`).
 */
export async function loadMask(path: string): Promise<MaskDocument> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (e) {
    throw new Error(`cannot read mask ${path}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    throw new Error(`mask ${path} is not valid JSON: ${(e as Error).message}`);
  }
  const parsed = MaskDocument.safeParse(json);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const where = issue && issue.path.length > 0 ? `${issue.path.join('.')}: ` : '';
    const more = parsed.error.issues.length > 1 ? ` (and ${parsed.error.issues.length - 1} more problem${parsed.error.issues.length > 2 ? 's' : ''})` : '';
    throw new Error(`mask ${path} is invalid: ${where}${issue?.message ?? 'unknown problem'}${more}`);
  }
  return parsed.data;
}
