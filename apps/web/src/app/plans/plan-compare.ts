import { ChangeDetectionStrategy, Component, computed, inject, input, linkedSignal, resource } from '@angular/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import type { PlanComparison, PlanDetail, PlanSummary } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { money, previousVersion, versionLabel, versionName } from './plan-format';
import { PlansApi } from './plans-api';

/** Which buses moved (charger or times) between this version and another of the same night. */
@Component({
  selector: 'ny-plan-compare',
  imports: [MatFormFieldModule, MatProgressBarModule, MatSelectModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    @if (candidates().length) {
      <mat-form-field appearance="outline" subscriptSizing="dynamic" class="ny-dense pick">
        <mat-label>Compare with</mat-label>
        <mat-select [value]="chosen()" (valueChange)="chosen.set($event)">
          @for (c of candidates(); track c.id) {
            <mat-option [value]="c.id">Version {{ c.version }} ({{ versionLabel(c).toLowerCase() }})</mat-option>
          }
        </mat-select>
      </mat-form-field>
      @if (loading()) {
        <mat-progress-bar mode="indeterminate" aria-label="Comparing the versions" />
      }
      <div aria-live="polite">
        @if (problem(); as p) {
          <p class="ny-form-error">{{ p }}</p>
        }
        @if (comparison(); as c) {
          <p class="change">{{ sentence(c) }}</p>
          @if (c.inputChanges.length) {
            <div class="inputs" role="note" aria-label="Inputs that differ">
              <p>
                The two versions were planned from different inputs, so the cost difference is not the plan's alone:
              </p>
              <ul>
                @for (line of c.inputChanges; track line) {
                  <li>{{ line }}.</li>
                }
              </ul>
            </div>
          }
        }
      </div>
      @if (comparison(); as c) {
        @if (c.moved.length) {
          <div class="table-scroll" role="region" aria-label="Buses that moved" tabindex="0">
            <table>
              <caption class="ny-visually-hidden">
                Buses whose charger or times differ between
                {{
                  versionName(c.from).toLowerCase()
                }}
                and
                {{
                  versionName(c.to).toLowerCase()
                }}
              </caption>
              <thead>
                <tr>
                  <th scope="col">Bus</th>
                  <th scope="col">{{ versionName(c.from) }}</th>
                  <th scope="col">{{ versionName(c.to) }}</th>
                </tr>
              </thead>
              <tbody>
                @for (m of c.moved; track m.bus) {
                  <tr>
                    <th scope="row">{{ m.bus }}</th>
                    <td>{{ m.before }}</td>
                    <td>{{ m.after }}</td>
                  </tr>
                }
              </tbody>
            </table>
          </div>
        }
      }
    } @else {
      <p class="empty">No other finished version of this night to compare with yet.</p>
    }
  `,
  styles: `
    :host {
      display: block;
    }
    .pick {
      width: 260px;
      max-width: 100%;
    }
    .change {
      margin: 8px 0;
      font: var(--mat-sys-body-large);
    }
    .inputs {
      margin: 0 0 8px;
      font: var(--mat-sys-body-medium);
      color: var(--mat-sys-on-surface-variant);
    }
    .inputs p {
      margin: 0;
    }
    .inputs ul {
      margin: 4px 0 0;
      padding-inline-start: 20px;
    }
    .empty {
      margin: 0;
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-body-medium);
    }
    .table-scroll {
      overflow-x: auto;
      max-height: 360px;
      overflow-y: auto;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: var(--mat-sys-corner-small);
    }
    table {
      width: 100%;
      border-collapse: collapse;
      font: var(--mat-sys-body-medium);
    }
    th,
    td {
      padding: 4px 12px;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
      text-align: start;
    }
    thead th {
      font-weight: 600;
      white-space: nowrap;
    }
  `,
})
export class PlanCompare {
  private readonly api = inject(PlansApi);
  protected readonly versionLabel = versionLabel;
  protected readonly versionName = versionName;

  readonly plan = input.required<PlanDetail>();
  readonly versions = input.required<readonly PlanSummary[]>();
  /** A version to compare with first (e.g. the one just published by someone else). */
  readonly preferred = input<string | null>(null);

  protected readonly candidates = computed(() =>
    this.versions()
      .filter((v) => v.id !== this.plan().id && v.status === 'done')
      .sort((a, b) => b.version - a.version),
  );
  protected readonly chosen = linkedSignal<string | null>(() => {
    const preferred = this.preferred();
    const list = this.candidates();
    if (preferred && list.some((c) => c.id === preferred)) return preferred;
    return previousVersion(this.versions(), this.plan())?.id ?? list[0]?.id ?? null;
  });
  /** The comparison with the chosen version, asked again only when either version changes. */
  private readonly pair = computed(() => {
    const plan = this.plan();
    const other = this.chosen();
    return other && plan.status === 'done' ? `${plan.id} ${other}` : undefined;
  });
  private readonly compared = resource({
    params: () => this.pair(),
    loader: ({ params }) => {
      const [id, other] = params.split(' ') as [string, string];
      return this.api.compare(id, other);
    },
  });
  protected readonly comparison = computed<PlanComparison | null>(() =>
    this.compared.hasValue() ? (this.compared.value() ?? null) : null,
  );
  protected readonly loading = this.compared.isLoading;
  protected readonly problem = computed(() => {
    const err = this.compared.error();
    return err ? toApiProblem(err).message : null;
  });

  protected sentence(c: PlanComparison): string {
    const moved =
      c.moved.length === 0 ? 'no bus moved' : `${c.moved.length} ${c.moved.length === 1 ? 'bus' : 'buses'} moved`;
    const against = `Against ${versionName(c.from).toLowerCase()}`;
    if (c.costChange === null) return `${against}: ${moved}.`;
    const currency = this.plan().currency;
    const cost =
      Math.abs(c.costChange) < 0.005
        ? 'the cost is the same'
        : `the cost is ${money(Math.abs(c.costChange), currency)} ${c.costChange > 0 ? 'higher' : 'lower'}`;
    return `${against}: ${moved}, ${cost}.`;
  }
}
