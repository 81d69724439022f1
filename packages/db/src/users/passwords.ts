import bcrypt from 'bcryptjs';

/** bcrypt cost; 12 is a few hundred ms on this class of machine, enough to slow offline guessing. */
export const BCRYPT_COST = 12;

export const hashPassword = (password: string, cost = BCRYPT_COST): Promise<string> => bcrypt.hash(password, cost);
export const verifyPassword = (password: string, hash: string): Promise<boolean> => bcrypt.compare(password, hash);
