import bcrypt from 'bcryptjs';
import { MAX_PASSWORD_BYTES, passwordBytes } from '@earmark/contracts';

/** bcrypt cost; 12 is a few hundred ms on this class of machine, enough to slow offline guessing. */
export const BCRYPT_COST = 12;

/**
 * bcrypt ignores everything past byte 72, so a longer password would be stored cut short.
 * Callers validate with the contracts' NewPassword first; this is the last line.
 */
export const hashPassword = (password: string, cost = BCRYPT_COST): Promise<string> => {
  if (passwordBytes(password) > MAX_PASSWORD_BYTES) throw new RangeError(`Password longer than ${MAX_PASSWORD_BYTES} bytes`);
  return bcrypt.hash(password, cost);
};

/**
 * A password over 72 bytes never matches (it cannot have been set), yet still costs one compare,
 * so its answer takes as long as any other failed sign-in.
 */
export const verifyPassword = async (password: string, hash: string): Promise<boolean> => {
  const tooLong = passwordBytes(password) > MAX_PASSWORD_BYTES;
  const matches = await bcrypt.compare(tooLong ? '' : password, hash);
  return matches && !tooLong;
};
