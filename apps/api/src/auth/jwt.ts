import jwt from 'jsonwebtoken';
import { z } from 'zod';

const Claims = z.object({
  sub: z.string(),
  typ: z.enum(['access', 'refresh']),
  ver: z.number().int(),
  /** Refresh tokens only: this token's unique id, and the sign-in chain (family) it belongs to. */
  jti: z.string().optional(),
  fam: z.string().optional(),
});
export type Claims = z.infer<typeof Claims>;

export interface TokenSigner {
  sign(claims: Claims): string;
  /** Returns the claims, or null for any bad token: wrong signature, `alg: none`, expired, wrong type. */
  verify(token: string, typ: Claims['typ']): Claims | null;
  ttlSeconds(typ: Claims['typ']): number;
}

/** HS256 only; the verifier pins the algorithm so `alg: none` and RS/HS confusion fail. */
export function createTokenSigner(secret: string, ttl: { access: number; refresh: number }): TokenSigner {
  return {
    sign: (claims) => jwt.sign(claims, secret, { algorithm: 'HS256', expiresIn: ttl[claims.typ], issuer: 'earmark' }),
    verify(token, typ) {
      try {
        const decoded = jwt.verify(token, secret, { algorithms: ['HS256'], issuer: 'earmark' });
        const claims = Claims.safeParse(decoded);
        return claims.success && claims.data.typ === typ ? claims.data : null;
      } catch {
        return null;
      }
    },
    ttlSeconds: (typ) => ttl[typ],
  };
}
