import { LiveAnnouncer } from '@angular/cdk/a11y';
import { ChangeDetectionStrategy, Component, effect, inject, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatMenuModule } from '@angular/material/menu';
import { MatSnackBar } from '@angular/material/snack-bar';
import { UnsavedEdits } from '../core/unsaved-edits';
import { DepotListStore } from '../depot-state/depot-list-store';

/**
 * The depot the app works on, in the top bar. With several depots it is a menu to switch (each
 * section then shows the chosen depot); with one it is only the name.
 */
@Component({
  selector: 'ny-depot-switcher',
  imports: [MatButtonModule, MatIconModule, MatMenuModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { '[class.compact]': 'compact()' },
  template: `
    @if (store.current(); as d) {
      @if (store.depots().length > 1) {
        <button
          type="button"
          class="depot switch"
          [matMenuTriggerFor]="menu"
          [attr.aria-label]="'Depot: ' + d.name + '. Switch depot'"
          [attr.title]="d.name"
          data-testid="depot-switcher"
        >
          <mat-icon class="depot-icon" aria-hidden="true">location_on</mat-icon>
          <span class="depot-name">{{ d.name }}</span>
          <mat-icon class="depot-icon" aria-hidden="true">arrow_drop_down</mat-icon>
        </button>
        <mat-menu #menu="matMenu" aria-label="Switch depot">
          <p class="menu-heading" aria-hidden="true">Switch depot</p>
          @for (option of store.depots(); track option.id) {
            <button
              mat-menu-item
              type="button"
              role="menuitemradio"
              [attr.aria-checked]="option.id === d.id"
              (click)="pick(option.id)"
            >
              <mat-icon>{{ option.id === d.id ? 'radio_button_checked' : 'radio_button_unchecked' }}</mat-icon>
              <span>{{ option.name }}</span>
            </button>
          }
        </mat-menu>
      } @else {
        <span class="depot" [attr.title]="d.name">
          <mat-icon class="depot-icon" aria-hidden="true">location_on</mat-icon>
          <span class="depot-name"><span class="ny-visually-hidden">Depot: </span>{{ d.name }}</span>
        </span>
      }
    }
  `,
  styles: `
    :host {
      display: inline-flex;
      min-width: 0;
    }
    .depot {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      min-width: 0;
      max-width: 100%;
      overflow: hidden;
      padding: 4px 12px 4px 8px;
      border: 0;
      border-radius: var(--mat-sys-corner-full);
      background: var(--mat-sys-secondary-container);
      color: var(--mat-sys-on-secondary-container);
      font: var(--mat-sys-label-large);
      white-space: nowrap;
    }
    .switch {
      min-height: 40px;
      padding-inline-end: 4px;
      cursor: pointer;
    }
    .switch:hover {
      background: color-mix(in srgb, var(--mat-sys-on-secondary-container) 8%, var(--mat-sys-secondary-container));
    }
    .switch:focus-visible {
      outline: 2px solid var(--mat-sys-primary);
      outline-offset: 2px;
    }
    .depot-name {
      min-width: 0;
      overflow: hidden;
      text-overflow: ellipsis;
    }
    .depot-icon {
      flex: none;
      font-size: 18px;
      width: 18px;
      height: 18px;
    }
    .switch .depot-icon:last-child {
      font-size: 24px;
      width: 24px;
      height: 24px;
    }
    :host(.compact) .depot {
      padding-inline-start: 6px;
      font: var(--mat-sys-label-medium);
    }
    .menu-heading {
      margin: 0;
      padding: 8px 16px 4px;
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-label-medium);
    }
  `,
})
export class DepotSwitcher {
  protected readonly store = inject(DepotListStore);
  private readonly unsaved = inject(UnsavedEdits);
  private readonly snackBar = inject(MatSnackBar);
  private readonly announcer = inject(LiveAnnouncer);
  /** Phone width: a smaller pill. */
  readonly compact = input(false);

  constructor() {
    effect(() => {
      const problem = this.store.choiceProblem();
      if (problem) this.snackBar.open(problem, 'OK', { duration: 10_000, politeness: 'assertive' });
    });
  }

  /** Switches depot, after asking when a form on the page holds edits not saved. */
  protected async pick(id: string): Promise<void> {
    if (id === this.store.current()?.id) return;
    const name = this.store.depots().find((d) => d.id === id)?.name ?? 'another depot';
    if (!(await this.unsaved.confirmDiscard(`Switching to ${name}`))) return;
    const chosen = this.store.choose(id);
    // The page changes under the menu's button, where focus stays: say what it shows now.
    void this.announcer.announce(`Now showing ${name}`);
    await chosen;
  }
}
