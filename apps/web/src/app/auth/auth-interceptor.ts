import { HttpErrorResponse, type HttpInterceptorFn, type HttpRequest } from '@angular/common/http';
import { inject } from '@angular/core';
import { catchError, from, switchMap, throwError } from 'rxjs';
import { AuthStore } from './auth-store';

/** Calls that never carry the access token and never trigger a refresh. */
const PUBLIC_AUTH_PATHS = [
  '/api/auth/login',
  '/api/auth/refresh',
  '/api/auth/forgot',
  '/api/auth/set-password',
  '/api/auth/action-tokens/',
];

function isApi(url: string): boolean {
  return url.startsWith('/api/');
}

function isPublicAuth(url: string): boolean {
  return PUBLIC_AUTH_PATHS.some((p) => url.startsWith(p));
}

function withBearer<T>(req: HttpRequest<T>, token: string | null): HttpRequest<T> {
  return token ? req.clone({ setHeaders: { Authorization: `Bearer ${token}` } }) : req;
}

/**
 * Adds `Authorization: Bearer` to API calls. On a 401 it refreshes once and retries; when the
 * refresh fails too, the session has ended: AuthStore keeps the unsaved input of the forms on
 * screen and sends the person to sign in, to come back to this page afterwards.
 */
export const authInterceptor: HttpInterceptorFn = (req, next) => {
  if (!isApi(req.url) || isPublicAuth(req.url)) return next(req);

  const store = inject(AuthStore);

  return next(withBearer(req, store.accessToken())).pipe(
    catchError((err: unknown) => {
      if (!(err instanceof HttpErrorResponse) || err.status !== 401 || req.url === '/api/auth/logout') {
        return throwError(() => err);
      }
      return from(store.refresh()).pipe(
        switchMap((refreshed) => {
          if (refreshed) return next(withBearer(req, store.accessToken()));
          store.endSession();
          return throwError(() => err);
        }),
      );
    }),
  );
};
