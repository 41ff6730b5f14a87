import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import type { Bus } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { injectIsPhone } from '../core/layout';
import { DepotListStore } from '../depot-state/depot-list-store';
import { SectionIntro } from '../sections/section-intro';
import { BusDialog, type BusDialogData } from './bus-dialog';
import { FleetApi } from './fleet-api';
import { injectCanEditFleet } from '../auth/role-checks';
import { BUS_STATUS_LABELS, fmt1, fmt2 } from './fleet-format';
import { FleetTabs } from './fleet-tabs';

export type BusSortKey =
  | 'number'
  | 'status'
  | 'usableKwh'
  | 'maxChargeKw'
  | 'connector'
  | 'kwhPerMile'
  | 'ceilingPct'
  | 'reservePct'
  | 'taperStartPct';

const collator = new Intl.Collator(undefined, { numeric: true, sensitivity: 'base' });
const STATUS_ORDER: Record<Bus['status'], number> = { active: 0, out_of_service: 1, retired: 2 };

/** The buses in the chosen order; the bus number (201 before 1001) breaks ties. */
export function sortBuses(buses: readonly Bus[], sort: Sort): Bus[] {
  const sign = sort.direction === 'desc' ? -1 : 1;
  const key = (sort.direction ? sort.active : 'number') as BusSortKey;
  const byKey = (a: Bus, b: Bus): number => {
    switch (key) {
      case 'number':
        return 0;
      case 'status':
        return STATUS_ORDER[a.status] - STATUS_ORDER[b.status];
      case 'connector':
        return collator.compare(a.connector, b.connector);
      case 'taperStartPct':
        return (a.taperStartPct ?? 101) - (b.taperStartPct ?? 101);
      default:
        return a[key] - b[key];
    }
  };
  return [...buses].sort(
    (a, b) => byKey(a, b) * sign || collator.compare(a.number, b.number) * (key === 'number' ? sign : 1),
  );
}

/** Fleet > Buses: the depot's buses; supervisors and administrators add and change them. */
@Component({
  selector: 'ny-buses-page',
  imports: [
    FleetTabs,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatProgressBarModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
    SectionIntro,
  ],
  templateUrl: './buses-page.html',
  styleUrl: './buses-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class BusesPage {
  private readonly api = inject(FleetApi);
  private readonly depots = inject(DepotListStore);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly canEdit = injectCanEditFleet();
  protected readonly phone = injectIsPhone();
  protected readonly fmt1 = fmt1;
  protected readonly fmt2 = fmt2;
  protected readonly statusLabels = BUS_STATUS_LABELS;
  /** Phones have no column headings to sort by: a choice instead. */
  protected readonly sortOptions: [BusSortKey, string][] = [
    ['number', 'Bus number'],
    ['status', 'Status'],
    ['usableKwh', 'Usable kWh (largest first)'],
    ['maxChargeKw', 'Max charge kW (largest first)'],
    ['kwhPerMile', 'kWh per mile (highest first)'],
  ];

  protected readonly buses = signal<Bus[]>([]);
  protected readonly loading = signal(true);
  protected readonly problem = signal<string | null>(null);
  protected readonly sort = signal<Sort>({ active: 'number', direction: 'asc' });
  protected readonly rows = computed(() => sortBuses(this.buses(), this.sort()));
  protected readonly columns = computed(() => {
    const base = [
      'number',
      'status',
      'usableKwh',
      'maxChargeKw',
      'connector',
      'kwhPerMile',
      'ceilingPct',
      'reservePct',
      'taperStartPct',
    ];
    return this.canEdit() ? [...base, 'actions'] : base;
  });
  protected readonly inService = computed(() => this.buses().filter((b) => b.status === 'active').length);

  constructor() {
    void this.load();
  }

  protected sortBy(key: BusSortKey): void {
    this.sort.set({ active: key, direction: key === 'number' || key === 'status' ? 'asc' : 'desc' });
  }

  protected statusText(bus: Bus): string {
    return this.statusLabels[bus.status];
  }

  private depotId(): string | null {
    return this.depots.current()?.id ?? null;
  }

  protected async load(): Promise<void> {
    this.loading.set(true);
    this.problem.set(null);
    try {
      await this.depots.load();
      const id = this.depotId();
      if (!id) {
        this.problem.set(this.depots.error() ?? 'No depot has been set up for your organisation yet.');
        return;
      }
      this.buses.set(await this.api.buses(id));
    } catch (err) {
      this.problem.set(toApiProblem(err).message);
    } finally {
      this.loading.set(false);
    }
  }

  protected edit(bus: Bus | null): void {
    const depotId = this.depotId();
    if (!depotId || !this.canEdit()) return;
    const data: BusDialogData = { depotId, bus, connectors: [...new Set(this.buses().map((b) => b.connector))] };
    this.dialog
      .open<BusDialog, BusDialogData, Bus>(BusDialog, {
        data,
        width: '640px',
        maxWidth: '95vw',
        autoFocus: 'first-tabbable',
      })
      .afterClosed()
      .subscribe((saved) => {
        if (!saved) return;
        this.buses.update((list) => [...list.filter((b) => b.id !== saved.id), saved]);
        this.snackBar.open(bus ? `Bus ${saved.number} saved` : `Bus ${saved.number} added`, 'OK');
        if (!bus) void this.depots.load(true);
      });
  }
}
