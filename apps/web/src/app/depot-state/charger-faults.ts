import { ChangeDetectionStrategy, Component, computed, inject, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { YARD_CREW, hasAnyRole, type Charger } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { timeAt } from '@nightyard/contracts/depot-time';

export interface ChargerFault {
  label: string;
  since: string | null;
}

/** The chargers in service that report a fault now (live state), by label. */
export function faultsOf(
  chargers: readonly Pick<Charger, 'label' | 'status' | 'live'>[],
  timeZone: string,
): ChargerFault[] {
  return chargers
    .filter((c) => c.status === 'in_service' && c.live?.status === 'faulted')
    .map((c) => ({ label: c.label, since: c.live?.seenAt ? timeAt(c.live.seenAt, timeZone) : null }))
    .sort((a, b) => a.label.localeCompare(b.label, undefined, { numeric: true }));
}

/**
 * A notice naming each charger that reports a fault, with the way to the re-plan: in Yard a button
 * (the page opens its report form), elsewhere a link to Yard for the roles that may report, or
 * whom to tell for the others.
 */
@Component({
  selector: 'ny-charger-faults',
  imports: [MatButtonModule, MatIconModule, RouterLink],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    @for (f of faults(); track f.label) {
      <div class="fault" role="alert" [attr.data-fault]="f.label">
        <mat-icon aria-hidden="true">report</mat-icon>
        <p>
          <strong>Charger {{ f.label }} reports a fault</strong
          >{{ f.since ? ' (since ' + f.since + ', depot time)' : '' }}. Do not use it until it is checked.
          @if (!inYard() && !canReplan()) {
            Tell the yard staff or the supervisor: reporting it in Yard re-plans the night without it.
          }
        </p>
        @if (inYard() && !canReport()) {
          <p>Acknowledge the shift's cautions below, then report it out of service so the night is re-planned.</p>
        } @else if (inYard()) {
          <button mat-flat-button type="button" (click)="replan.emit(f.label)">
            <mat-icon>build</mat-icon>
            Report charger {{ f.label }} out of service
          </button>
        } @else if (canReplan()) {
          <a mat-flat-button routerLink="/yard" [queryParams]="{ fault: f.label }">
            <mat-icon>build</mat-icon>
            Re-plan without charger {{ f.label }}
          </a>
        }
      </div>
    }
  `,
  styles: `
    :host {
      display: grid;
      gap: 8px;
    }
    :host:empty {
      display: none;
    }
    .fault {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px 16px;
      padding: 12px 16px;
      border-radius: 12px;
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
    }
    p {
      flex: 1 1 280px;
      margin: 0;
    }
    mat-icon {
      flex: none;
    }
  `,
})
export class ChargerFaults {
  private readonly auth = inject(AuthStore);
  /** The depot's chargers, their `live` state as fresh as the page has it. */
  readonly chargers = input.required<readonly Pick<Charger, 'label' | 'status' | 'live'>[]>();
  readonly timezone = input.required<string>();
  /** On the Yard page: a button that asks the page to open its report form. */
  readonly inYard = input(false);
  /** In Yard: the shift's cautions are acknowledged, so the report form may open. */
  readonly canReport = input(true);
  readonly replan = output<string>();

  protected readonly faults = computed(() => faultsOf(this.chargers(), this.timezone()));
  protected readonly canReplan = computed(() => hasAnyRole(this.auth.roles(), YARD_CREW));
}
