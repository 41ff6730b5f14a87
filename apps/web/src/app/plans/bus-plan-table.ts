import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { moveBy } from '../yard/yard-format';
import { num, type BusPlanRow } from './plan-format';

/** The plan bus by bus: short buses first, with how much and why in plain words. */
@Component({
  selector: 'ny-bus-plan-table',
  imports: [MatIconModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <div class="table-scroll wide-only" role="region" aria-label="Buses in the plan" tabindex="0">
      <table class="buses">
        <caption class="ny-visually-hidden">
          Each bus: charger, plug-in and unplug times (the yard crew's unless marked as the driver's), energy, state of
          charge at departure, shortfall and why (short buses first)
        </caption>
        <thead>
          <tr>
            <th scope="col">Bus</th>
            <th scope="col">Charger</th>
            <th scope="col">Plug in</th>
            <th scope="col">Unplug</th>
            <th scope="col" class="num">kWh</th>
            <th scope="col">Departs (SOC)</th>
            <th scope="col" class="num">Short kWh</th>
            <th scope="col">Why short</th>
          </tr>
        </thead>
        <tbody>
          @for (r of rows(); track r.bus) {
            <tr [class.short]="r.short">
              <th scope="row">
                @if (r.short) {
                  <mat-icon class="warn" aria-hidden="true">warning</mat-icon>
                }
                {{ r.bus }}
              </th>
              <td>
                @for (s of r.sessions; track $index) {
                  <span class="line">{{ s.charger }}</span>
                } @empty {
                  <span class="none">Not plugged in</span>
                }
              </td>
              <td>
                @for (s of r.sessions; track $index) {
                  <span class="line"
                    >{{ s.plugIn }}
                    @if (s.plugInByDriver) {
                      <span class="by">{{ driverIn }}</span>
                    }
                  </span>
                }
              </td>
              <td>
                @for (s of r.sessions; track $index) {
                  <span class="line"
                    >{{ s.unplug }}
                    @if (s.unplugByDriver) {
                      <span class="by">{{ driverOut }}</span>
                    }
                  </span>
                }
              </td>
              <td class="num">
                @for (s of r.sessions; track $index) {
                  <span class="line">{{ num(s.kwh) }}</span>
                }
                @if (r.sessions.length > 1) {
                  <span class="line total">{{ num(r.kwh) }}</span>
                }
              </td>
              <td>
                @for (d of r.departures; track $index) {
                  <span class="line"
                    >{{ d.at }}
                    @if (d.socPct !== null) {
                      ({{ num(d.socPct, 0) }} %)
                    }
                  </span>
                }
              </td>
              <td class="num">{{ r.short ? num(r.shortfallKwh) : '–' }}</td>
              <td>
                @if (r.short) {
                  <span class="reason">{{ r.reason }}</span>
                  <span class="detail">{{ r.reasonDetail }}</span>
                } @else if (topUps().includes(r.bus)) {
                  <span class="ok">Leaves at its ceiling; tops up at the midday layover</span>
                } @else {
                  <span class="ok">Leaves with its energy</span>
                }
              </td>
            </tr>
          } @empty {
            <tr>
              <td colspan="8">No buses in this plan.</td>
            </tr>
          }
        </tbody>
      </table>
    </div>
    <ul class="cards" aria-label="Buses in the plan, one card each">
      @for (r of rows(); track r.bus) {
        <li class="bus-card" [class.short]="r.short">
          <span class="bus-name">
            @if (r.short) {
              <mat-icon class="warn" aria-hidden="true">warning</mat-icon>
            }
            Bus {{ r.bus }}
          </span>
          <dl>
            <dt>Plug-ins</dt>
            <dd>
              @for (s of r.sessions; track $index) {
                <span class="line"
                  >{{ s.charger }} {{ s.plugIn }}–{{ s.unplug }}
                  @if (s.plugInByDriver || s.unplugByDriver) {
                    <span class="by">{{ driverMoves(s) }}</span>
                  }
                </span>
              } @empty {
                <span class="none">Not plugged in</span>
              }
            </dd>
            <dt>kWh</dt>
            <dd class="num">{{ num(r.kwh) }}</dd>
            <dt>Departs (SOC)</dt>
            <dd>
              @for (d of r.departures; track $index) {
                <span class="line"
                  >{{ d.at }}
                  @if (d.socPct !== null) {
                    ({{ num(d.socPct, 0) }} %)
                  }
                </span>
              }
            </dd>
            <dt>Short kWh</dt>
            <dd class="num">{{ r.short ? num(r.shortfallKwh) : '–' }}</dd>
            @if (r.short) {
              <dt>Why short</dt>
              <dd>
                <span class="reason">{{ r.reason }}</span> <span class="detail">{{ r.reasonDetail }}</span>
              </dd>
            } @else if (topUps().includes(r.bus)) {
              <dt>Note</dt>
              <dd>Leaves at its ceiling; tops up at the midday layover</dd>
            }
          </dl>
        </li>
      }
    </ul>
  `,
  styles: `
    :host {
      display: block;
    }
    .table-scroll {
      overflow-x: auto;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: var(--mat-sys-corner-small);
      background: var(--mat-sys-surface);
    }
    .buses {
      width: 100%;
      min-width: 760px;
      border-collapse: collapse;
      font: var(--mat-sys-body-medium);
    }
    th,
    td {
      padding: 6px 12px;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
      text-align: start;
      vertical-align: top;
    }
    thead th {
      font: var(--mat-sys-title-small);
      white-space: nowrap;
    }
    tbody th {
      font-weight: 600;
      white-space: nowrap;
    }
    tr.short {
      background: color-mix(in srgb, var(--mat-sys-error) 8%, transparent);
    }
    .warn {
      color: var(--mat-sys-error);
      font-size: 18px;
      width: 18px;
      height: 18px;
      vertical-align: -3px;
    }
    .reason {
      font-weight: 600;
      color: var(--mat-sys-error);
    }
    .by {
      display: block;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
    .detail {
      display: block;
      max-width: 34ch;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
    .ok {
      color: var(--mat-sys-on-surface-variant);
    }
    .num {
      text-align: end;
      font-variant-numeric: tabular-nums;
      white-space: nowrap;
    }
    .line {
      display: block;
      white-space: nowrap;
    }
    .total {
      border-top: 1px solid var(--mat-sys-outline-variant);
      font-weight: 600;
    }
    .none {
      color: var(--mat-sys-on-surface-variant);
    }
    .cards {
      display: none;
      margin: 0;
      padding: 0;
      list-style: none;
    }
    @media (max-width: 599.98px) {
      .wide-only {
        display: none;
      }
      .cards {
        display: flex;
        flex-direction: column;
        gap: 8px;
      }
    }
    .bus-card {
      padding: 8px 12px;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: var(--mat-sys-corner-small);
      background: var(--mat-sys-surface);
      font: var(--mat-sys-body-medium);
    }
    .bus-card.short {
      background: color-mix(in srgb, var(--mat-sys-error) 8%, var(--mat-sys-surface));
    }
    .bus-name {
      font: var(--mat-sys-title-small);
    }
    dl {
      display: grid;
      grid-template-columns: max-content 1fr;
      gap: 2px 12px;
      margin: 4px 0 0;
    }
    dt {
      color: var(--mat-sys-on-surface-variant);
    }
    dd {
      margin: 0;
    }
    dd.num {
      text-align: start;
    }
  `,
})
export class BusPlanTable {
  readonly rows = input.required<readonly BusPlanRow[]>();
  /** Buses that leave at their ceiling and top up at the next midday layover. */
  readonly topUps = input<readonly string[]>([]);
  protected readonly num = num;
  // The run sheets' words for the driver's moves (yard-format.ts), one wording on both screens.
  protected readonly driverIn = moveBy({ action: 'connect', by: 'driver' });
  protected readonly driverOut = moveBy({ action: 'disconnect', by: 'driver' });
  /** Which moves of a plug-in its driver makes. */
  protected driverMoves(s: BusPlanRow['sessions'][number]): string {
    if (s.plugInByDriver && s.unplugByDriver) return `${this.driverIn} and ${this.driverOut.replace(/^Driver, /, '')}`;
    return s.plugInByDriver ? this.driverIn : this.driverOut;
  }
}
