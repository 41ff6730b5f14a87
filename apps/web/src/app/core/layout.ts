import { BreakpointObserver } from '@angular/cdk/layout';
import { inject, type Signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { map } from 'rxjs';

/** Phone widths: the navigation becomes a drawer and tables become lists. */
export const PHONE_QUERY = '(max-width: 600px)';

/** True while the viewport is phone-sized. Call in an injection context. */
export function injectIsPhone(): Signal<boolean> {
  const observer = inject(BreakpointObserver);
  return toSignal(observer.observe(PHONE_QUERY).pipe(map((r) => r.matches)), {
    initialValue: observer.isMatched(PHONE_QUERY),
  });
}
