import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { ServiceDay } from '@nightyard/contracts';
import { SOC_SOURCE_LABELS, clockOf, fmt1 } from './fleet-format';
import { pullInText } from './run-rows';

/** A day's runs to read: times, distance, energy and the state of charge on arrival with its source. */
@Component({
  selector: 'ny-runs-table',
  templateUrl: './runs-table.html',
  styleUrl: './runs-grid.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-dense' },
})
export class RunsTable {
  readonly day = input.required<ServiceDay>();
  /** The day in words, for the table's caption. */
  readonly dayText = input.required<string>();

  protected readonly busCount = computed(() => new Set(this.day().runs.map((r) => r.busId)).size);
  protected readonly fmt1 = fmt1;
  protected readonly clockOf = clockOf;
  protected readonly pullInText = pullInText;
  protected readonly sourceLabels = SOC_SOURCE_LABELS;
}
