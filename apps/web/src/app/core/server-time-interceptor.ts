import { HttpErrorResponse, HttpResponse, type HttpInterceptorFn } from '@angular/common/http';
import { inject } from '@angular/core';
import { tap } from 'rxjs';
import { Clock } from './clock';

export const SERVER_TIME_HEADER = 'X-Server-Time';

/** Sets the app's clock from the `X-Server-Time` header (ms since the epoch) of every API answer. */
export const serverTimeInterceptor: HttpInterceptorFn = (req, next) => {
  if (!req.url.startsWith('/api/')) return next(req);
  const clock = inject(Clock);
  // A duration, so the device's monotonic clock is right here whatever its wall clock says.
  const sentAt = performance.now();
  const read = (headers: HttpResponse<unknown>['headers'] | null | undefined) => {
    const value = headers?.get(SERVER_TIME_HEADER);
    if (value && /^\d+$/.test(value.trim())) clock.setServerTime(Number(value), performance.now() - sentAt);
  };
  return next(req).pipe(
    tap({
      next: (event) => {
        if (event instanceof HttpResponse) read(event.headers);
      },
      error: (err: unknown) => {
        if (err instanceof HttpErrorResponse) read(err.headers);
      },
    }),
  );
};
