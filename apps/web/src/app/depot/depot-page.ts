import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  Injector,
  computed,
  inject,
  signal,
  type EffectRef,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import type { Cabinet, Charger, DepotDetail } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { ChargerFaults, faultsOf } from '../depot-state/charger-faults';
import { DepotListStore } from '../depot-state/depot-list-store';
import { LiveStore, reloadOnLive, type LiveDepot } from '../depot-state/live-store';
import { ConfirmDialog, type ConfirmData } from '../people/confirm-dialog';
import { SectionIntro } from '../sections/section-intro';
import { injectCanEditSetup } from '../auth/role-checks';
import { CabinetDialog, type CabinetDialogData } from './cabinet-dialog';
import { CabinetPanel } from './cabinet-panel';
import { ChargerDialog, type ChargerDialogData } from './charger-dialog';
import { ChargerTable } from './charger-table';
import { DepotApi } from './depot-api';
import { DepotSettingsPanel } from './depot-settings-panel';
import { LoadReductionWindowsPanel } from './load-reduction-windows-panel';
import { PeaksSoFarPanel } from './peaks-so-far-panel';
import { YardCrewPanel } from './yard-crew-panel';

type LoadState = 'loading' | 'loaded' | 'failed' | 'none';

/** The Depot section: what the plans work against. Facilities and admin edit; everyone reads. */
@Component({
  selector: 'ny-depot-page',
  imports: [
    CabinetPanel,
    ChargerFaults,
    ChargerTable,
    DepotSettingsPanel,
    LoadReductionWindowsPanel,
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
    PeaksSoFarPanel,
    YardCrewPanel,
    SectionIntro,
  ],
  templateUrl: './depot-page.html',
  styleUrls: ['../shared/panel.scss', './depot-page.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class DepotPage {
  private readonly store = inject(DepotListStore);
  private readonly api = inject(DepotApi);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly canEdit = injectCanEditSetup();
  protected readonly state = signal<LoadState>('loading');
  protected readonly problem = signal<string | null>(null);
  protected readonly depot = signal<DepotDetail | null>(null);
  /** The depot's rate plan currency (the cost tolerance is an amount in it). */
  protected readonly currency = computed(
    () => this.store.depots().find((d) => d.id === this.depot()?.id)?.currency ?? null,
  );
  private readonly liveStore = inject(LiveStore);
  private readonly destroyRef = inject(DestroyRef);
  private readonly injector = inject(Injector);
  /** The depot's live stream: each charger's state as it changes. */
  private readonly live = signal<LiveDepot | null>(null);
  private liveReload: EffectRef | null = null;
  protected readonly chargers = computed(() => {
    const list = this.depot()?.chargers ?? [];
    return this.live()?.withLive(list) ?? list;
  });
  protected readonly faultCount = computed(() => faultsOf(this.chargers(), this.depot()?.timezone ?? 'UTC').length);

  constructor() {
    void this.load();
  }

  /** Follows the depot's live stream (a revision may take a charger out of service: reload then). */
  private follow(depotId: string): void {
    if (this.live()?.depotId === depotId) return;
    const live = this.liveStore.watch(depotId, this.destroyRef);
    this.live.set(live);
    this.liveReload?.destroy();
    this.liveReload = reloadOnLive(live, () => void this.refresh(false), this.injector);
  }

  protected async load(): Promise<void> {
    this.state.set('loading');
    this.problem.set(null);
    try {
      await this.store.load();
      if (this.store.state() === 'failed') throw new Error(this.store.error() ?? '');
      const current = this.store.current();
      if (!current) {
        this.state.set('none');
        return;
      }
      this.depot.set(await this.api.detail(current.id));
      this.state.set('loaded');
      this.follow(current.id);
    } catch (err) {
      this.problem.set(err instanceof Error && err.message ? err.message : toApiProblem(err).message);
      this.state.set('failed');
    }
  }

  /** After a change: the depot as the API now has it, and the shell's summary too. */
  private async refresh(summary = true): Promise<void> {
    const d = this.depot();
    if (!d) return;
    try {
      this.depot.set(await this.api.detail(d.id));
    } catch (err) {
      this.snackBar.open(toApiProblem(err).message, 'OK');
    }
    if (summary) void this.store.load(true);
  }

  protected onSettingsSaved(detail: DepotDetail): void {
    this.depot.set(detail);
    void this.store.load(true);
  }

  protected onWindowsSaved(windows: DepotDetail['loadReductionWindows']): void {
    this.depot.update((d) => (d ? { ...d, loadReductionWindows: windows } : d));
  }

  protected onPeaksSaved(peaks: DepotDetail['peaksSoFar']): void {
    this.depot.update((d) => (d ? { ...d, peaksSoFar: peaks } : d));
  }

  protected onYardCrewSaved(yardCrew: DepotDetail['yardCrew']): void {
    this.depot.update((d) => (d ? { ...d, yardCrew } : d));
  }

  protected openCharger(charger?: Charger): void {
    const d = this.depot();
    if (!d) return;
    const data: ChargerDialogData = {
      depotId: d.id,
      charger,
      cabinets: d.cabinets,
      chargers: d.chargers,
      serviceLimitKw: d.serviceLimitKw,
    };
    this.dialog
      .open<ChargerDialog, ChargerDialogData, Charger>(ChargerDialog, {
        data,
        width: '560px',
        maxWidth: '95vw',
        autoFocus: 'first-tabbable',
      })
      .afterClosed()
      .subscribe((saved) => {
        if (!saved) return;
        this.snackBar.open(charger ? `Charger ${saved.label} saved` : `Charger ${saved.label} added`, 'OK');
        void this.refresh();
      });
  }

  protected removeCharger(charger: Charger): void {
    const d = this.depot();
    if (!d) return;
    this.confirm(
      {
        title: `Remove charger ${charger.label}?`,
        message: `Plans stop using ${charger.label} from now on. To take it out for a while, mark it out of service instead.`,
        confirm: 'Remove',
      },
      async () => {
        await this.api.removeCharger(d.id, charger.id);
        this.snackBar.open(`Charger ${charger.label} removed`, 'OK');
      },
    );
  }

  protected openCabinet(cabinet?: Cabinet): void {
    const d = this.depot();
    if (!d) return;
    this.dialog
      .open<CabinetDialog, CabinetDialogData, Cabinet>(CabinetDialog, {
        data: { depotId: d.id, cabinet },
        width: '480px',
        maxWidth: '95vw',
      })
      .afterClosed()
      .subscribe((saved) => {
        if (!saved) return;
        this.snackBar.open(cabinet ? `Power cabinet ${saved.label} saved` : `Power cabinet ${saved.label} added`, 'OK');
        void this.refresh();
      });
  }

  protected removeCabinet(cabinet: Cabinet): void {
    const d = this.depot();
    if (!d) return;
    // A cabinet with chargers on it cannot go (the server refuses): say so, and offer no Remove.
    const on = d.chargers.filter((c) => c.cabinetId === cabinet.id).map((c) => c.label);
    if (on.length) {
      this.confirm(
        {
          title: `Power cabinet ${cabinet.label} cannot be removed yet`,
          message: `${on.length === 1 ? `Charger ${on[0]} is` : `Chargers ${on.join(', ')} are`} on ${cabinet.label}. Move ${on.length === 1 ? 'it' : 'them'} to another cabinet, or to no cabinet, under Chargers first; then remove the cabinet.`,
          confirm: null,
        },
        async () => undefined,
      );
      return;
    }
    this.confirm(
      {
        title: `Remove power cabinet ${cabinet.label}?`,
        message: `${cabinet.label} has no chargers on it. Plans stop counting its limit from now on.`,
        confirm: 'Remove',
      },
      async () => {
        await this.api.removeCabinet(d.id, cabinet.id);
        this.snackBar.open(`Power cabinet ${cabinet.label} removed`, 'OK');
      },
    );
  }

  private confirm(data: ConfirmData, action: () => Promise<void>): void {
    this.dialog
      .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '440px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe(async (yes) => {
        if (!yes) return;
        try {
          await action();
          await this.refresh();
        } catch (err) {
          this.snackBar.open(toApiProblem(err).message, 'OK', { duration: 10_000, politeness: 'assertive' });
        }
      });
  }
}
