import { ChangeDetectionStrategy, Component, DOCUMENT, computed, effect, inject, linkedSignal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatListModule } from '@angular/material/list';
import { MatMenuModule } from '@angular/material/menu';
import { MatSidenavModule } from '@angular/material/sidenav';
import { MatToolbarModule } from '@angular/material/toolbar';
import { NavigationEnd, Router, RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { ROLE_LABELS } from '@nightyard/contracts';
import { filter } from 'rxjs';
import { AuthStore } from '../auth/auth-store';
import { injectIsPhone } from '../core/layout';
import { ThemeStore, type ThemeChoice } from '../core/theme-store';
import { DepotListStore } from '../depot-state/depot-list-store';
import { LiveStore } from '../depot-state/live-store';
import { DepotSwitcher } from './depot-switcher';

interface ThemeOption {
  value: ThemeChoice;
  label: string;
  icon: string;
}

@Component({
  selector: 'ny-shell',
  imports: [
    DepotSwitcher,
    MatButtonModule,
    MatIconModule,
    MatListModule,
    MatMenuModule,
    MatSidenavModule,
    MatToolbarModule,
    RouterLink,
    RouterLinkActive,
    RouterOutlet,
  ],
  templateUrl: './shell.html',
  styleUrl: './shell.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: {
    '[class.ny-phone]': 'phone()',
    '[class.ny-yard]': 'yardStaff()',
  },
})
export class Shell {
  private readonly auth = inject(AuthStore);
  private readonly depots = inject(DepotListStore);
  private readonly router = inject(Router);
  private readonly document = inject(DOCUMENT);
  protected readonly theme = inject(ThemeStore);

  protected readonly phone = injectIsPhone();
  /** Open beside the page on a laptop, closed (a drawer) on a phone; reset when the width class changes. */
  protected readonly navOpen = linkedSignal(() => !this.phone());

  protected readonly user = this.auth.user;
  protected readonly sections = this.auth.sections;
  protected readonly roleNames = computed(() =>
    this.auth
      .roles()
      .map((r) => ROLE_LABELS[r])
      .join(', '),
  );
  protected readonly yardStaff = computed(() => this.auth.roles().includes('yard'));
  /** Each depot switch renders the routed page anew. */
  private readonly switches = this.depots.switches;
  protected readonly outletKey = computed(() => [{ switches: this.switches() }]);
  private readonly live = inject(LiveStore);

  protected readonly themeOptions: readonly ThemeOption[] = [
    { value: 'device', label: 'Match device', icon: 'contrast' },
    { value: 'light', label: 'Light', icon: 'light_mode' },
    { value: 'dark', label: 'Dark', icon: 'dark_mode' },
  ];

  constructor() {
    void this.depots.load();
    // After a switch the page of the depot before is gone: its live stream closes now.
    effect(() => {
      if (this.switches() > 0) setTimeout(() => this.live.closeIdle());
    });

    // After each in-app navigation: close the drawer on a phone and move focus to the page.
    this.router.events
      .pipe(
        filter((e): e is NavigationEnd => e instanceof NavigationEnd),
        takeUntilDestroyed(),
      )
      .subscribe(() => {
        if (this.phone()) this.navOpen.set(false);
        queueMicrotask(() => this.document.getElementById('main')?.focus({ preventScroll: true }));
      });
  }

  protected toggleNav(): void {
    this.navOpen.update((open) => !open);
  }

  protected async signOut(): Promise<void> {
    await this.auth.signOut();
    this.depots.reset();
    await this.router.navigate(['/sign-in']);
  }
}
