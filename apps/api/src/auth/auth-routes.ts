import type { Request, Response } from 'express';
import { z } from 'zod';
import {
  actionTokenInfoSchema,
  forgotPasswordRequestSchema,
  loginRequestSchema,
  meResponseSchema,
  setPasswordRequestSchema,
  text,
  tokenResponseSchema,
  EVERY_ROLE,
} from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import type { ApiRoutes } from '../http/route';
import * as auth from './auth-service';

export const REFRESH_COOKIE = 'ny_refresh';
const COOKIE_PATH = '/api/auth';

/**
 * The cookie lives as long as its token, counted as Max-Age (relative): the browser judges it by its
 * own clock, which need not be the API's (development and tests stand the API at other instants).
 */
function setRefreshCookie(req: Request, res: Response, token: string, expires: Date, now: Date) {
  res.cookie(REFRESH_COOKIE, token, {
    httpOnly: true,
    sameSite: 'strict',
    secure: req.secure,
    path: COOKIE_PATH,
    maxAge: Math.max(0, expires.getTime() - now.getTime()),
  });
}

const messageSchema = z.object({ message: z.string() });

export function authRoutes(api: ApiRoutes, { db, auth: settings, mailer, log, clock }: AppDeps) {
  api.add(
    {
      method: 'post',
      path: '/auth/login',
      summary: 'Sign in with e-mail and password',
      tag: 'auth',
      access: 'public',
      body: loginRequestSchema,
      response: tokenResponseSchema,
    },
    async ({ body, req, res }) => {
      const issued = await auth.login(db, settings, body.email, body.password, req.ip ?? 'unknown', clock());
      setRefreshCookie(req, res, issued.refreshToken, issued.refreshExpiresAt, clock());
      return issued.response;
    },
  );

  api.add(
    {
      method: 'post',
      path: '/auth/refresh',
      summary: 'Swap the refresh cookie for a new access token (204 without a cookie: no session to restore)',
      tag: 'auth',
      access: 'public',
      response: tokenResponseSchema,
    },
    async ({ req, res }) => {
      const cookie: unknown = req.cookies?.[REFRESH_COOKIE];
      // No cookie at all is not a failure but "no session here": the sign-in page's probe on every
      // load answers quietly instead of with a 401 in the browser's console.
      if (typeof cookie !== 'string' || cookie === '') {
        res.status(204).end();
        return;
      }
      const issued = await auth.refresh(db, settings, cookie, clock());
      setRefreshCookie(req, res, issued.refreshToken, issued.refreshExpiresAt, clock());
      return issued.response;
    },
  );

  api.add(
    {
      method: 'post',
      path: '/auth/logout',
      summary: 'Sign out: end this session',
      tag: 'auth',
      access: 'public',
      status: 204,
    },
    async ({ req, res }) => {
      await auth.logout(db, req.cookies?.[REFRESH_COOKIE], clock());
      res.clearCookie(REFRESH_COOKIE, { path: COOKIE_PATH });
    },
  );

  api.add(
    {
      method: 'get',
      path: '/auth/me',
      summary: 'The signed-in user',
      tag: 'auth',
      access: EVERY_ROLE,
      response: meResponseSchema,
    },
    async ({ user }) => ({ user: await auth.me(db, user.id) }),
  );

  api.add(
    {
      method: 'post',
      path: '/auth/forgot',
      summary: 'Send a password reset link if the account exists',
      tag: 'auth',
      access: 'public',
      body: forgotPasswordRequestSchema,
      response: messageSchema,
      status: 202,
    },
    async ({ body, req }) => {
      await auth.forgotPassword(db, settings, mailer, log, body.email, req.ip ?? 'unknown', clock());
      return { message: 'If an account exists for that address, a link to reset the password is on its way.' };
    },
  );

  api.add(
    {
      method: 'get',
      path: '/auth/action-tokens/:token',
      summary: 'Who an invitation or reset link is for',
      tag: 'auth',
      access: 'public',
      params: z.strictObject({ token: text('The link').min(20, 'The link is incomplete').max(200) }),
      response: actionTokenInfoSchema,
    },
    async ({ params }) => auth.actionTokenInfo(db, params.token, clock()),
  );

  api.add(
    {
      method: 'post',
      path: '/auth/set-password',
      summary: 'Choose a password from an invitation or reset link',
      tag: 'auth',
      access: 'public',
      body: setPasswordRequestSchema,
      status: 204,
    },
    async ({ body }) => auth.setPassword(db, body.token, body.password, clock()),
  );
}
