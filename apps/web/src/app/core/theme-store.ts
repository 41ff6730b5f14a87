import { DOCUMENT, Injectable, computed, inject, signal } from '@angular/core';

export type ThemeChoice = 'device' | 'light' | 'dark';

const STORAGE_KEY = 'nightyard.theme';

/**
 * Light, dark or whatever the device prefers. The stylesheet follows `color-scheme: light dark`;
 * a pinned choice adds a class on <html> and is kept in localStorage.
 */
@Injectable({ providedIn: 'root' })
export class ThemeStore {
  private readonly document = inject(DOCUMENT);
  private readonly storage: Storage | null = this.document.defaultView?.localStorage ?? null;

  readonly choice = signal<ThemeChoice>(this.read());
  readonly icon = computed(() => {
    switch (this.choice()) {
      case 'light':
        return 'light_mode';
      case 'dark':
        return 'dark_mode';
      default:
        return 'contrast';
    }
  });

  constructor() {
    this.apply(this.choice());
  }

  choose(choice: ThemeChoice): void {
    this.choice.set(choice);
    try {
      if (choice === 'device') this.storage?.removeItem(STORAGE_KEY);
      else this.storage?.setItem(STORAGE_KEY, choice);
    } catch {
      // Storage may be disabled (private mode); the choice still holds for this visit.
    }
    this.apply(choice);
  }

  private read(): ThemeChoice {
    try {
      const stored = this.storage?.getItem(STORAGE_KEY);
      return stored === 'light' || stored === 'dark' ? stored : 'device';
    } catch {
      return 'device';
    }
  }

  private apply(choice: ThemeChoice): void {
    const root = this.document.documentElement;
    root.classList.toggle('ny-theme-light', choice === 'light');
    root.classList.toggle('ny-theme-dark', choice === 'dark');
  }
}
