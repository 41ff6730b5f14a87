import { createHash, randomBytes } from 'node:crypto';
import bcrypt from 'bcryptjs';

const BCRYPT_ROUNDS = 10;

export const hashPassword = (password: string) => bcrypt.hash(password, BCRYPT_ROUNDS);
export const checkPassword = (password: string, hash: string) => bcrypt.compare(password, hash);

/** A hash that costs as much to compare as a real one, so unknown e-mails take as long as known. */
export const DUMMY_HASH = bcrypt.hashSync('not-a-real-password-ever', BCRYPT_ROUNDS);

/** Opaque tokens for cookies and e-mailed links; only their SHA-256 is stored. */
export function newOpaqueToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}

export const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');
