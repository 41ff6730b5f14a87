import { createHash, randomBytes } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { runInPool } from '../workers/pool';

const BCRYPT_ROUNDS = 10;

// bcrypt takes tens of milliseconds of CPU on purpose: it runs in the worker pool, so twenty
// sign-ins at once do not queue every other request behind them.
export const hashPassword = (password: string) => runInPool({ kind: 'hash-password', password, rounds: BCRYPT_ROUNDS });
export const checkPassword = (password: string, hash: string) => runInPool({ kind: 'check-password', password, hash });

/** A hash that costs as much to compare as a real one, so unknown e-mails take as long as known. */
export const DUMMY_HASH = bcrypt.hashSync('not-a-real-password-ever', BCRYPT_ROUNDS);

/** Opaque tokens for cookies and e-mailed links; only their SHA-256 is stored. */
export function newOpaqueToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}

export const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');
