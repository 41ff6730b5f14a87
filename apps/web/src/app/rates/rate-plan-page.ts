import { ChangeDetectionStrategy, Component, computed, inject, input, resource } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router, RouterLink } from '@angular/router';
import type { RatePlan } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { DepotListStore } from '../depot-state/depot-list-store';
import { ConfirmDialog, type ConfirmData } from '../people/confirm-dialog';
import { injectCanEditSetup } from '../auth/role-checks';
import { RatePlanSummary } from './rate-plan-summary';
import { RatePreviewPanel } from './rate-preview-panel';
import { RatesApi } from './rates-api';

/** One rate plan: a day's prices (chart and table) and the plan itself, read by every role. */
@Component({
  selector: 'ny-rate-plan-page',
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule, RatePlanSummary, RatePreviewPanel, RouterLink],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
  template: `
    <nav class="crumbs" aria-label="Breadcrumb">
      <a routerLink="/rates">Rates</a>
      <mat-icon aria-hidden="true">chevron_right</mat-icon>
      <span aria-current="page">{{ plan()?.name ?? 'Rate plan' }}</span>
    </nav>

    @if (loading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading the rate plan" />
    }
    @if (problem(); as p) {
      <div class="problem" role="alert">
        <p>The rate plan could not be loaded. {{ p }}</p>
        <button mat-stroked-button type="button" (click)="reload()">Try again</button>
      </div>
    }

    @if (plan(); as p) {
      <div class="ny-page-header">
        <div>
          <h1>{{ p.name }}</h1>
          <p class="ny-lead">{{ seasonCount() }} · prices in {{ p.definition.currency }}</p>
        </div>
        @if (canEdit()) {
          <div class="actions">
            <a mat-stroked-button [routerLink]="['/rates', p.id, 'edit']"><mat-icon>edit</mat-icon>Edit rate plan</a>
            <button mat-button type="button" (click)="remove(p)"><mat-icon>delete</mat-icon>Remove</button>
          </div>
        }
      </div>

      <div class="ny-stack">
        <section class="panel" aria-labelledby="plan-preview-heading">
          <h2 id="plan-preview-heading">Preview a day</h2>
          <p class="hint">The price of each hour and where demand charges apply, at the depot's clock.</p>
          @if (depotReady()) {
            <ny-rate-preview-panel [planId]="p.id" [timezone]="timezone()" [initialDate]="date() ?? null" />
          }
        </section>

        <section class="panel" aria-labelledby="plan-definition-heading">
          <h2 id="plan-definition-heading">The plan</h2>
          <ny-rate-plan-summary [definition]="p.definition" />
        </section>
      </div>
    }
  `,
  styleUrl: '../shared/panel.scss',
  styles: `
    :host {
      display: block;
    }
    .crumbs {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 4px;
      margin-bottom: 8px;
      font: var(--mat-sys-label-large);
    }
    .crumbs mat-icon {
      font-size: 18px;
      width: 18px;
      height: 18px;
      color: var(--mat-sys-on-surface-variant);
    }
    /* A long plan name wraps on a phone instead of running off the screen. */
    .crumbs span {
      min-width: 0;
      overflow-wrap: anywhere;
    }
    h1 {
      overflow-wrap: anywhere;
    }
    h2 {
      margin-bottom: 4px;
    }
    .actions {
      display: flex;
      flex-wrap: wrap;
      gap: 8px;
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
export class RatePlanPage {
  private readonly api = inject(RatesApi);
  private readonly depots = inject(DepotListStore);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly router = inject(Router);

  /** Route parameter. */
  readonly id = input.required<string>();
  /** Query parameter: the day to preview first (YYYY-MM-DD). */
  readonly date = input<string>();

  protected readonly canEdit = injectCanEditSetup();
  private readonly loaded = resource({ params: () => this.id(), loader: ({ params: id }) => this.api.get(id) });
  protected readonly plan = computed(() => (this.loaded.hasValue() ? this.loaded.value() : null));
  protected readonly loading = this.loaded.isLoading;
  protected readonly problem = computed(() => {
    const err = this.loaded.error();
    return err ? toApiProblem(err).message : null;
  });
  protected readonly depotReady = computed(() => ['loaded', 'failed'].includes(this.depots.state()));
  protected readonly timezone = computed(() => this.depots.current()?.timezone ?? 'UTC');
  protected readonly seasonCount = computed(() => {
    const n = this.plan()?.definition.seasons.length ?? 0;
    return n === 1 ? '1 season' : `${n} seasons`;
  });

  constructor() {
    void this.depots.load();
  }

  protected reload(): void {
    this.loaded.reload();
  }

  protected remove(plan: RatePlan): void {
    const data: ConfirmData = {
      title: `Remove ${plan.name}?`,
      message: 'Only a plan no depot is billed under can be removed. This cannot be undone.',
      confirm: 'Remove',
    };
    this.dialog
      .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '440px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe(async (yes) => {
        if (!yes) return;
        try {
          await this.api.remove(plan.id);
          this.snackBar.open(`Rate plan "${plan.name}" removed`, 'OK');
          await this.router.navigate(['/rates']);
        } catch (err) {
          this.snackBar.open(toApiProblem(err).message, 'OK', { duration: 10_000, politeness: 'assertive' });
        }
      });
  }
}
