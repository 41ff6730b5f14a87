import { ChangeDetectionStrategy, Component, InjectionToken, computed, inject, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { DepotListStore } from '../depot-state/depot-list-store';
import { Clock } from './clock';
import { viewerTimeZone, zoneNote } from '@nightyard/contracts/depot-time';

/** The viewer's own time zone (the browser's); tests give one explicitly. */
export const VIEWER_TIME_ZONE = new InjectionToken<string>('VIEWER_TIME_ZONE', { factory: viewerTimeZone });

/**
 * One line per page, shown only when the viewer's zone is not the depot's: every time on the
 * page is the depot's wall clock, so a planner away from the depot reads them right.
 */
@Component({
  selector: 'ny-depot-time-note',
  imports: [MatIconModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    @if (note(); as text) {
      <p class="ny-depot-time-note">
        <mat-icon aria-hidden="true">schedule</mat-icon><span>{{ text }}</span>
      </p>
    }
  `,
  styles: `
    .ny-depot-time-note {
      display: flex;
      align-items: center;
      gap: 6px;
      margin: 4px 0 0;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
    mat-icon {
      width: 18px;
      height: 18px;
      font-size: 18px;
      flex: none;
    }
  `,
})
export class DepotTimeNote {
  private readonly depots = inject(DepotListStore);
  private readonly clock = inject(Clock);
  private readonly viewerZone = inject(VIEWER_TIME_ZONE);

  /** The depot's zone; by default the current depot's. */
  readonly timezone = input<string | null>(null);

  protected readonly note = computed(() => {
    const zone = this.timezone() ?? this.depots.current()?.timezone;
    return zone ? zoneNote(zone, this.viewerZone, this.clock.tick()) : null;
  });
}
