import { HttpErrorResponse, type HttpInterceptorFn, type HttpRequest } from '@angular/common/http';
import { inject } from '@angular/core';
import { Router } from '@angular/router';
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
 * refresh fails too, it sends the person to sign in and comes back afterwards.
 */
export const authInterceptor: HttpInterceptorFn = (req, next) => {
  if (!isApi(req.url) || isPublicAuth(req.url)) return next(req);

  const store = inject(AuthStore);
  const router = inject(Router);

  return next(withBearer(req, store.accessToken())).pipe(
    catchError((err: unknown) => {
      if (!(err instanceof HttpErrorResponse) || err.status !== 401 || req.url === '/api/auth/logout') {
        return throwError(() => err);
      }
      return from(store.refresh()).pipe(
        switchMap((refreshed) => {
          if (refreshed) return next(withBearer(req, store.accessToken()));
          const current = router.url;
          const returnUrl = current && current !== '/' && !current.startsWith('/sign-in') ? current : undefined;
          void router.navigate(['/sign-in'], { queryParams: returnUrl ? { returnUrl } : {} });
          return throwError(() => err);
        }),
      );
    }),
  );
};
