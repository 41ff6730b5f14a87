import { NgTemplateOutlet } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input, output, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MatSortModule, type Sort, type SortDirection } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import type { Charger } from '@nightyard/contracts';
import { injectIsPhone } from '../core/layout';
import { formatInstant, formatKw } from './depot-setup-format';
import { outPeriod } from '../depot-state/charger-out';

export type ChargerSortKey = 'label' | 'maxKw' | 'connector' | 'cabinet' | 'status';
export type StatusFilter = 'all' | 'in_service' | 'out_of_service';

export interface ChargerView {
  query: string;
  status: StatusFilter;
  sort: ChargerSortKey;
  direction: SortDirection;
}

const collator = new Intl.Collator(undefined, { numeric: true, sensitivity: 'base' });

function compare(a: Charger, b: Charger, key: ChargerSortKey): number {
  switch (key) {
    case 'maxKw':
      return a.maxKw - b.maxKw;
    case 'connector':
      return collator.compare(a.connector, b.connector);
    case 'cabinet':
      // Chargers without a cabinet sort after those with one.
      return collator.compare(a.cabinetLabel ?? '\uffff', b.cabinetLabel ?? '\uffff');
    case 'status':
      return a.status === b.status ? 0 : a.status === 'in_service' ? -1 : 1;
    default:
      return 0;
  }
}

/** The chargers to show: matching the filter, in the chosen order (label breaks ties, C2 before C10). */
export function viewChargers(chargers: readonly Charger[], view: ChargerView): Charger[] {
  const q = view.query.trim().toLowerCase();
  const sign = view.direction === 'desc' ? -1 : 1;
  return chargers
    .filter((c) => view.status === 'all' || c.status === view.status)
    .filter(
      (c) =>
        !q ||
        [c.label, c.connector, c.cabinetLabel ?? 'no cabinet', c.statusReason ?? '', `${c.maxKw} kw`].some((s) =>
          s.toLowerCase().includes(q),
        ),
    )
    .sort((a, b) => {
      const byKey = view.direction ? compare(a, b, view.sort) * sign : 0;
      return byKey || collator.compare(a.label, b.label) * (view.sort === 'label' ? sign : 1);
    });
}

/** What the charger last said over OCPP, e.g. "Reports charging at 42 kW". */
function liveText(c: Charger): string | null {
  if (!c.live) return null;
  const power = c.live.status === 'charging' && c.live.powerKw !== null ? ` at ${formatKw(c.live.powerKw)}` : '';
  return `Reports ${c.live.status === 'connected' ? 'a bus plugged in, not charging' : c.live.status}${power}`;
}

/** The depot's chargers: sortable by each column, filtered by text and status. */
@Component({
  selector: 'ny-charger-table',
  imports: [
    NgTemplateOutlet,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
  ],
  templateUrl: './charger-table.html',
  styleUrls: ['../shared/panel.scss', './charger-table.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ChargerTable {
  readonly chargers = input.required<readonly Charger[]>();
  readonly timezone = input('UTC');
  readonly canEdit = input(false);
  readonly edit = output<Charger>();
  readonly remove = output<Charger>();

  protected readonly phone = injectIsPhone();
  protected readonly kw = formatKw;
  protected readonly query = signal('');
  protected readonly status = signal<StatusFilter>('all');
  protected readonly sort = signal<Sort>({ active: 'label', direction: 'asc' });

  protected readonly columns = computed(() =>
    this.canEdit()
      ? ['label', 'maxKw', 'connector', 'cabinet', 'status', 'actions']
      : ['label', 'maxKw', 'connector', 'cabinet', 'status'],
  );
  protected readonly rows = computed(() =>
    viewChargers(this.chargers(), {
      query: this.query(),
      status: this.status(),
      sort: this.sort().active as ChargerSortKey,
      direction: this.sort().direction,
    }).map((charger) => ({
      charger,
      since: formatInstant(charger.statusSince, this.timezone()),
      period: outPeriod(charger),
      live: liveText(charger),
    })),
  );
  protected readonly countText = computed(() => {
    const shown = this.rows().length;
    const all = this.chargers().length;
    return shown === all ? `${all} ${all === 1 ? 'charger' : 'chargers'}` : `Showing ${shown} of ${all} chargers`;
  });

  protected readonly sortChoices: { value: string; label: string }[] = [
    { value: 'label:asc', label: 'Label' },
    { value: 'maxKw:desc', label: 'Maximum kW, highest first' },
    { value: 'maxKw:asc', label: 'Maximum kW, lowest first' },
    { value: 'connector:asc', label: 'Connector' },
    { value: 'cabinet:asc', label: 'Power cabinet' },
    { value: 'status:desc', label: 'Out of service first' },
  ];
  protected readonly sortChoice = computed(() => `${this.sort().active}:${this.sort().direction}`);

  protected chooseSort(value: string): void {
    const [active, direction] = value.split(':') as [string, SortDirection];
    this.sort.set({ active, direction });
  }

  protected onInput(event: Event): void {
    this.query.set((event.target as HTMLInputElement).value);
  }
}
