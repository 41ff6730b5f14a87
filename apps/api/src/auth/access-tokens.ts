import { createSecretKey } from 'node:crypto';
import jwt from 'jsonwebtoken';
import { ExtractJwt, Strategy as JwtStrategy } from 'passport-jwt';
import passport from 'passport';
import type { NextFunction, Request, Response } from 'express';
import { and, eq, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { userDepots, users } from '../db/schema';
import { DomainError } from '../http/errors';
import type { AuthUser } from './auth-user';
import type { Clock } from '../time/clock';
import type { KnownUsers } from './known-users';

const ISSUER = 'nightyard';
const AUDIENCE = 'nightyard-api';

export function signAccessToken(
  secret: string,
  seconds: number,
  user: { id: string; organisationId: string },
  now: Date,
): string {
  // iat from the API's clock: jsonwebtoken then counts the expiry from it, not from the machine's clock.
  return jwt.sign({ org: user.organisationId, iat: Math.floor(now.getTime() / 1000) }, secret, {
    subject: user.id,
    expiresIn: seconds,
    issuer: ISSUER,
    audience: AUDIENCE,
    algorithm: 'HS256',
  });
}

/**
 * Express middleware that accepts a Bearer access token. The user is re-read on every request, or
 * taken from `known` (which forgets a user the moment they change), so a deactivation or a change
 * of roles takes effect at once, not when the token expires.
 */
export function bearerAuthenticator(db: Db, secret: string, clock: Clock, known?: KnownUsers) {
  // Every signed-in request reads its user: a named statement, planned once per connection.
  const activeUser = db
    .select({
      id: users.id,
      organisationId: users.organisationId,
      email: users.email,
      name: users.name,
      roles: users.roles,
      // The caller's depots in the same round trip (mayOpenDepot decides with them).
      depotIds: sql<
        string[]
      >`coalesce((select array_agg(${userDepots.depotId}::text order by ${userDepots.depotId}) from ${userDepots} where ${userDepots.userId} = "users"."id"), '{}'::text[])`,
    })
    .from(users)
    .where(
      and(
        eq(users.id, sql.placeholder('id')),
        eq(users.organisationId, sql.placeholder('organisationId')),
        eq(users.status, 'active'),
      ),
    )
    .prepare('active_user');
  const strategy = new JwtStrategy(
    {
      jwtFromRequest: ExtractJwt.fromAuthHeaderAsBearerToken(),
      // A key object, not the string: jsonwebtoken otherwise tries (and fails) to read the string
      // as a public key on every request before taking it as a secret, about a millisecond each.
      secretOrKey: createSecretKey(Buffer.from(secret)) as unknown as Buffer,
      issuer: ISSUER,
      audience: AUDIENCE,
      algorithms: ['HS256'],
    },
    (payload: { sub?: string; org?: string }, done: (err: unknown, user?: AuthUser | false) => void) => {
      if (!payload.sub || !payload.org) return done(null, false);
      const remembered = known?.get(payload.sub, payload.org);
      if (remembered) return done(null, remembered);
      const mark = known?.mark() ?? 0;
      activeUser.execute({ id: payload.sub, organisationId: payload.org }).then(
        ([row]) => {
          if (row) known?.keep(row, mark);
          done(null, row ?? false);
        },
        (err) => done(err),
      );
    },
  );
  // passport-jwt copies its verify options once; jsonwebtoken reads clockTimestamp at each verify.
  // A getter makes expiry follow the API's clock (tests and development may stand it elsewhere).
  const verifyOptions = (strategy as unknown as { _verifOpts: Record<string, unknown> })._verifOpts;
  Object.defineProperty(verifyOptions, 'clockTimestamp', {
    get: () => Math.floor(clock().getTime() / 1000),
    enumerable: true,
  });
  const instance = new passport.Passport();
  instance.use('jwt', strategy);

  return (req: Request, res: Response, next: NextFunction) => {
    instance.authenticate('jwt', { session: false }, (err: unknown, user: AuthUser | false, info?: Error) => {
      if (err) return next(err);
      if (!user) {
        const message =
          info?.name === 'TokenExpiredError'
            ? 'Your session token has expired: refresh it or sign in again'
            : info?.message === 'No auth token'
              ? 'Sign in first: send an access token as "Authorization: Bearer ..."'
              : 'The access token is not valid: sign in again';
        return next(new DomainError('unauthenticated', message, undefined, { 'WWW-Authenticate': 'Bearer' }));
      }
      req.user = user;
      next();
    })(req, res, next);
  };
}
