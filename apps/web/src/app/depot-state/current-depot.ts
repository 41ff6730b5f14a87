import { ChangeDetectionStrategy, Component, inject, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { DepotListStore } from './depot-list-store';
import { DepotSummaryCard } from './depot-summary-card';

/** The current depot's summary card, with its loading, failure and empty states. */
@Component({
  selector: 'ny-current-depot',
  imports: [DepotSummaryCard, MatButtonModule, MatProgressBarModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    @switch (store.state()) {
      @case ('failed') {
        <div class="problem" role="alert">
          <p>The depot could not be loaded. {{ store.error() }}</p>
          <button mat-stroked-button type="button" (click)="store.load(true)">Try again</button>
        </div>
      }
      @case ('loaded') {
        @if (store.current(); as depot) {
          <ny-depot-summary-card [depot]="depot" [prominent]="prominent()" />
        } @else {
          <p>No depot has been set up for your organisation yet.</p>
        }
      }
      @default {
        <mat-progress-bar mode="indeterminate" aria-label="Loading the depot" />
      }
    }
  `,
  styles: `
    :host {
      display: block;
    }
    mat-progress-bar {
      max-width: 760px;
    }
    .problem {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px 16px;
      color: var(--mat-sys-error);
    }
  `,
})
export class CurrentDepot {
  protected readonly store = inject(DepotListStore);
  readonly prominent = input(false);

  constructor() {
    void this.store.load();
  }
}
