import {
  ChangeDetectionStrategy,
  Component,
  DOCUMENT,
  DestroyRef,
  ElementRef,
  computed,
  effect,
  inject,
  input,
  signal,
  untracked,
  viewChild,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatMenuModule } from '@angular/material/menu';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { isIsoDate } from '@nightyard/contracts/depot-time';
import { injectIsPhone } from '../core/layout';
import { ThemeStore } from '../core/theme-store';
import { ChargerFaults, faultsOf } from '../depot-state/charger-faults';
import { DepotListStore } from '../depot-state/depot-list-store';
import { SectionIntro } from '../sections/section-intro';
import { ChargerCard } from './charger-card';
import { NextHour } from './next-hour';
import { ReportDialog, type ReportDialogData, type ReportOutcome, type ReportPreset } from './report-dialog';
import { RunSheets, type RunSheetChoice } from './run-sheets';
import { ShiftCautions } from './shift-cautions';
import { clock, day, isNightAt, relative, reportLine } from './yard-format';
import { YardStore } from './yard-store';

/**
 * The Yard section: tonight's published plan at the depot, charger by charger, for the people who
 * plug the buses in (phone first, dark at night, big targets), with the shift's cautions, the
 * report flow and printable run sheets.
 */
@Component({
  selector: 'ny-yard-page',
  imports: [
    ChargerCard,
    ChargerFaults,
    MatButtonModule,
    MatIconModule,
    MatMenuModule,
    MatProgressBarModule,
    NextHour,
    RunSheets,
    SectionIntro,
    ShiftCautions,
  ],
  providers: [YardStore],
  templateUrl: './yard-page.html',
  styleUrl: './yard-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class YardPage {
  protected readonly store = inject(YardStore);
  private readonly depots = inject(DepotListStore);
  private readonly dialog = inject(MatDialog);
  private readonly theme = inject(ThemeStore);
  private readonly document = inject(DOCUMENT);
  private readonly phone = injectIsPhone();

  /** Query parameter `night` (`YYYY-MM-DD`): the night an e-mail link was about. */
  readonly night = input<string>();

  protected readonly depotState = this.depots.state;
  protected readonly depot = this.depots.current;
  protected readonly printChoice = signal<RunSheetChoice>({ charger: null, perPage: false });

  protected readonly tz = this.store.timezone;
  protected readonly nowClock = computed(() => clock(this.store.now(), this.tz()));
  protected readonly overdue = computed(() => this.store.steps().filter((s) => s.state === 'overdue').length);
  protected readonly startsAt = computed(() => {
    const h = this.store.horizon();
    if (!h || !this.store.upcoming()) return null;
    return `${day(h.start, this.tz())} at ${clock(h.start, this.tz())}, ${relative(h.start, this.store.now())}`;
  });
  protected readonly nightSpan = computed(() => {
    const h = this.store.horizon();
    return h
      ? `${day(h.start, this.tz())} ${clock(h.start, this.tz())} to ${day(h.end, this.tz())} ${clock(h.end, this.tz())}`
      : '';
  });
  /** When a link names another night than the one shown here, what the page shows instead. */
  protected readonly linkedNightNote = computed(() => {
    const night = this.night();
    if (this.store.state() !== 'loaded' || !night || !isIsoDate(night)) return null;
    const shown = this.store.plan()?.serviceDate ?? null;
    if (shown === night) return null;
    const named = new Intl.DateTimeFormat('en-GB', {
      weekday: 'long',
      day: 'numeric',
      month: 'long',
      timeZone: 'UTC',
    }).format(Date.parse(`${night}T12:00:00Z`));
    if (shown && night < shown) return `The night of ${named} is over: this is tonight's plan.`;
    return `The link was for the night of ${named}: its steps show here when that night begins. Until then this is tonight's plan.`;
  });
  protected readonly reports = computed(() =>
    (this.store.tonight()?.reports ?? []).map((r) => reportLine(r, this.tz())),
  );
  protected readonly chargerLabels = computed(() => this.store.chargerViews().map((c) => c.label));
  protected readonly faults = computed(() => faultsOf(this.store.liveChargers(), this.tz()));
  /** `?fault=<label>` (from the fault notice on Tonight or Depot): the report form opens for it. */
  readonly fault = input<string>();
  private faultOffered = false;
  private readonly noticeBox = viewChild<ElementRef<HTMLElement>>('noticeBox');
  /** The revision whose notice was last brought into view. */
  private noticeShown: number | null = null;

  constructor() {
    // A report or "did not happen" is made far down the page on a phone, and its step then
    // leaves the card: the revision's notice at the top is brought into view and focused, so the
    // answer is seen (and read out). Revisions made by others stay where they are.
    effect(() => {
      const notice = this.store.notice();
      const box = this.noticeBox()?.nativeElement;
      if (!notice?.mine || !box || this.noticeShown === notice.version) return;
      this.noticeShown = notice.version;
      box.scrollIntoView?.({ block: 'start', behavior: 'smooth' });
      box.focus({ preventScroll: true });
    });

    void this.depots.load();
    effect(() => {
      const depot = this.depots.current();
      if (depot) untracked(() => void this.store.start(depot.id));
    });

    effect(() => {
      const label = this.fault();
      const faulted = label && this.store.acknowledged() && this.faults().some((f) => f.label === label);
      if (faulted && !this.faultOffered) {
        this.faultOffered = true;
        untracked(() => this.reportFault(label));
      }
    });

    // Night colours for the yard: with the theme menu on "Match device", the page is dark while
    // tonight's plan (the server's night) is under way; a pinned Light or Dark choice always wins.
    const root = this.document.documentElement;
    effect(() => {
      const night = this.theme.choice() === 'device' && isNightAt(this.store.now(), this.store.horizon());
      root.style.colorScheme = night ? 'dark' : '';
    });

    const view = this.document.defaultView;
    const afterPrint = () => this.printChoice.set({ charger: null, perPage: false });
    view?.addEventListener('afterprint', afterPrint);
    inject(DestroyRef).onDestroy(() => {
      root.style.colorScheme = '';
      view?.removeEventListener('afterprint', afterPrint);
    });
  }

  protected openReport(preset?: ReportPreset): void {
    const plan = this.store.plan();
    const depotId = this.store.depotId();
    if (!plan || !depotId) return;
    const phone = this.phone();
    const data: ReportDialogData = {
      depotId,
      planId: plan.id,
      timezone: this.tz(),
      now: this.store.now(),
      buses: this.store.buses(),
      chargers: this.chargerLabels(),
      nightStart: this.store.horizon()?.start,
      preset,
    };
    this.dialog
      .open<ReportDialog, ReportDialogData, ReportOutcome>(ReportDialog, {
        data,
        width: phone ? '100vw' : '560px',
        maxWidth: '100vw',
        height: phone ? '100dvh' : undefined,
        maxHeight: '100dvh',
        autoFocus: 'first-tabbable',
      })
      .afterClosed()
      .subscribe((outcome) => {
        if (!outcome) return;
        if ('result' in outcome) void this.store.reported(outcome.result);
        else void this.store.load();
      });
  }

  /** A charger reports a fault: the report form, ready to take it out of service. */
  protected reportFault(label: string): void {
    const since = this.faults().find((f) => f.label === label)?.since;
    this.openReport({
      kind: 'charger_out',
      charger: label,
      reason: `The charger reported a fault${since ? ` at ${since}` : ''}`,
    });
  }

  protected reloadDepot(): void {
    void this.depots.load(true);
  }

  protected print(choice: RunSheetChoice): void {
    this.printChoice.set(choice);
    // Let the sheets render the choice before the browser's print dialog freezes the page.
    setTimeout(() => this.document.defaultView?.print(), 50);
  }
}
