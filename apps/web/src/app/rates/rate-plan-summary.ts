import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { RatePlanDefinition } from '@nightyard/contracts';
import { formatDate } from '../depot/depot-setup-format';
import { describeWindow, formatMoney, formatPrice, monthRange } from './rate-format';

/** A rate plan's definition as text and tables (how every role reads it). */
@Component({
  selector: 'ny-rate-plan-summary',
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <dl class="facts">
      <div>
        <dt>Currency</dt>
        <dd>{{ definition().currency }}</dd>
      </div>
      <div>
        <dt>Fixed charges</dt>
        <dd>
          @for (f of fixed(); track $index) {
            <span class="line">{{ f }}</span>
          } @empty {
            None
          }
        </dd>
      </div>
      <div>
        <dt>Demand ratchet</dt>
        <dd>{{ ratchet() }}</dd>
      </div>
      <div>
        <dt>Minimum bill</dt>
        <dd>{{ minimum() }}</dd>
      </div>
      <div class="wide">
        <dt>Holidays (priced as holidays)</dt>
        <dd>
          @if (holidays().length) {
            {{ holidays().join(', ') }}
          } @else {
            None listed
          }
        </dd>
      </div>
    </dl>

    @for (s of seasons(); track $index) {
      <section class="season" [attr.aria-labelledby]="id + '-s' + $index">
        <h3 [id]="id + '-s' + $index">
          {{ s.name }} <span class="months">{{ s.months }}</span>
        </h3>
        <p class="season-facts">
          Off-peak (every hour outside the periods below): <strong>{{ s.offPeak }}</strong> per kWh. Facility demand
          charge: <strong>{{ s.facility }}</strong> per kW on the billing period's highest 15 minutes.
        </p>
        @if (s.blocks.length) {
          <p class="season-facts">
            Tiered energy, the billing period's kWh in time order:
            @for (b of s.blocks; track $index; let last = $last) {
              {{ b }}{{ last ? '.' : ';' }}
            }
          </p>
        }
        @if (s.periods.length) {
          <div class="table-scroll" role="region" [attr.aria-label]="'Time-of-use periods, ' + s.name" tabindex="0">
            <table class="plain">
              <caption class="ny-visually-hidden">
                Time-of-use periods of
                {{
                  s.name
                }}
              </caption>
              <thead>
                <tr>
                  <th scope="col">Period</th>
                  <th scope="col" class="num">Price per kWh</th>
                  <th scope="col" class="num">Demand charge per kW</th>
                  <th scope="col">When</th>
                </tr>
              </thead>
              <tbody>
                @for (p of s.periods; track $index) {
                  <tr>
                    <th scope="row">{{ p.name }}</th>
                    <td class="num">{{ p.price }}</td>
                    <td class="num">{{ p.demand }}</td>
                    <td>
                      @for (w of p.windows; track $index) {
                        <span class="line">{{ w }}</span>
                      }
                    </td>
                  </tr>
                }
              </tbody>
            </table>
          </div>
        } @else {
          <p class="empty">No time-of-use periods: every hour is off-peak.</p>
        }
      </section>
    }
  `,
  styleUrls: ['../shared/panel.scss', './rate-table.scss'],
  styles: `
    .season {
      margin-top: 16px;
    }
    h3 {
      font: var(--mat-sys-title-medium);
      margin: 0 0 4px;
    }
    .months {
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-body-medium);
      margin-inline-start: 8px;
    }
    .season-facts {
      margin: 0 0 8px;
      font: var(--mat-sys-body-medium);
      max-width: 80ch;
    }
    .line {
      display: block;
    }
    .facts dd {
      font: var(--mat-sys-body-large);
    }
    .facts .wide {
      grid-column: 1 / -1;
    }
  `,
})
export class RatePlanSummary {
  readonly definition = input.required<RatePlanDefinition>();
  protected readonly id = `ny-plan-${Math.random().toString(36).slice(2, 9)}`;

  protected readonly fixed = computed(() => {
    const c = this.definition().currency;
    return this.definition().fixedCharges.map((f) => `${f.name}: ${formatMoney(f.amount, c)} per ${f.per}`);
  });
  protected readonly ratchet = computed(() => {
    const r = this.definition().demandRatchet;
    return r
      ? `Facility demand billed at least ${r.percent} % of the highest of the previous ${r.months} months (from meter readings, published plans and peaks entered under Depot)`
      : 'None';
  });
  protected readonly minimum = computed(() => {
    const m = this.definition().minimumCharge;
    return m ? `${formatMoney(m.amount, this.definition().currency)} per ${m.per}` : 'None';
  });
  protected readonly holidays = computed(() => this.definition().holidays.map(formatDate));
  protected readonly seasons = computed(() => {
    const c = this.definition().currency;
    return this.definition().seasons.map((s) => ({
      name: s.name,
      months: monthRange(s.fromMonth, s.toMonth),
      offPeak: formatPrice(s.offPeakPrice, c),
      facility: formatMoney(s.facilityDemandCharge, c),
      blocks: (s.energyBlocks ?? []).map((b, i, all) => {
        const from = i === 0 ? 0 : (all[i - 1]!.uptoKwh ?? 0);
        const range =
          b.uptoKwh === null
            ? `above ${from.toLocaleString('en-US')} kWh`
            : `${from.toLocaleString('en-US')} to ${b.uptoKwh.toLocaleString('en-US')} kWh`;
        const change =
          b.adder === 0
            ? 'at the time-of-use price'
            : `${b.adder > 0 ? '+' : '−'}${formatPrice(Math.abs(b.adder), c)} per kWh`;
        return `${range} ${change}`;
      }),
      periods: s.periods.map((p) => ({
        name: p.name,
        price: formatPrice(p.price, c),
        demand: p.demandCharge ? formatMoney(p.demandCharge, c) : 'None',
        windows: p.windows.map(describeWindow),
      })),
    }));
  });
}
