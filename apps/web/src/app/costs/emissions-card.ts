import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { MonthCosts } from '@nightyard/contracts';
import { num } from './costs-format';

/**
 * Diesel and CO2 avoided by the miles driven electric, for finance and grant reports, with the
 * API's source text shown word for word beside the figures.
 */
@Component({
  selector: 'ny-emissions-card',
  imports: [MatIconModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <section class="card" aria-labelledby="emissions-heading">
      <h2 id="emissions-heading"><mat-icon aria-hidden="true">eco</mat-icon>Diesel and CO2 avoided</h2>
      <dl class="figures">
        <div>
          <dt>Diesel avoided</dt>
          <dd>{{ gallons() }}</dd>
        </div>
        <div>
          <dt>CO2 avoided</dt>
          <dd>{{ co2() }}</dd>
        </div>
        <div>
          <dt>Miles driven electric</dt>
          <dd>{{ miles() }}</dd>
        </div>
      </dl>
      <p class="scope">
        Runs of this billing period up to today, against diesel buses at {{ mpg() }} miles per gallon.
      </p>
      <p class="source">
        <strong>Source: </strong><span class="source-text">{{ emissions().source }}</span>
      </p>
    </section>
  `,
  styles: `
    :host {
      display: block;
      min-width: 0;
    }
    .card {
      box-sizing: border-box;
      height: 100%;
      padding: 16px;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: var(--mat-sys-corner-medium);
      background: var(--mat-sys-surface-container-low);
    }
    h2 {
      display: flex;
      align-items: center;
      gap: 8px;
      margin-bottom: 12px;
    }
    h2 mat-icon {
      color: var(--mat-sys-primary);
    }
    .figures {
      display: grid;
      grid-template-columns: repeat(auto-fit, minmax(140px, 1fr));
      gap: 12px 24px;
      margin: 0 0 12px;
    }
    .figures > div {
      min-width: 0;
    }
    dt {
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-label-large);
    }
    dd {
      margin: 2px 0 0;
      font: var(--mat-sys-headline-small);
      font-variant-numeric: tabular-nums;
    }
    .scope,
    .source {
      margin: 0 0 6px;
      max-width: 90ch;
      font: var(--mat-sys-body-medium);
    }
    .source {
      color: var(--mat-sys-on-surface-variant);
    }
  `,
})
export class EmissionsCard {
  readonly emissions = input.required<MonthCosts['emissions']>();

  protected readonly gallons = computed(() => `${num(this.emissions().dieselGallonsAvoided, 0)} gallons`);
  protected readonly co2 = computed(() => {
    const kg = this.emissions().co2KgAvoided;
    return kg >= 1000 ? `${num(kg / 1000, 2)} tonnes` : `${num(kg, 0)} kg`;
  });
  protected readonly miles = computed(() => `${num(this.emissions().miles, 0)} miles`);
  protected readonly mpg = computed(() => num(this.emissions().dieselMpg, 1));
}
