import { DestroyRef, computed, inject, signal, type Signal } from '@angular/core';
import { ThemeStore } from '../core/theme-store';

/**
 * The theme's colours for a chart. A canvas cannot use CSS variables, so each colour is read from
 * a hidden probe element styled with a `--mat-sys-*` variable (`[data-colour="name"]` by default),
 * and read again whenever the light/dark choice or the device's colour scheme changes.
 * Call in an injection context; `probes` is the element that holds the probes.
 */
export function injectThemeColours<K extends string>(
  probes: Signal<{ nativeElement: HTMLElement } | undefined>,
  fallback: Readonly<Record<K, string>>,
  attribute = 'data-colour',
): Signal<Record<K, string>> {
  const theme = inject(ThemeStore);
  const schemeTick = signal(0);
  const media = typeof matchMedia === 'function' ? matchMedia('(prefers-color-scheme: dark)') : null;
  const bump = () => schemeTick.update((n) => n + 1);
  media?.addEventListener?.('change', bump);
  inject(DestroyRef).onDestroy(() => media?.removeEventListener?.('change', bump));

  return computed(() => {
    theme.choice();
    schemeTick();
    const host = probes()?.nativeElement;
    if (!host || typeof getComputedStyle !== 'function') return { ...fallback };
    const out = {} as Record<K, string>;
    for (const name of Object.keys(fallback) as K[]) {
      const el = host.querySelector<HTMLElement>(`[${attribute}="${name}"]`);
      const value = el ? getComputedStyle(el).color : '';
      out[name] = value && value !== 'rgba(0, 0, 0, 0)' ? value : fallback[name];
    }
    return out;
  });
}
