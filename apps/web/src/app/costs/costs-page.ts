import {
  ChangeDetectionStrategy,
  Component,
  computed,
  inject,
  input,
  linkedSignal,
  resource,
  signal,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import { COST_EDITORS, footedCents, hasAnyRole, toCents, type MonthCosts } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { toApiProblem } from '../core/api-error';
import { Clock } from '../core/clock';
import { ISO_DATE } from '@nightyard/contracts/depot-time';
import { DepotListStore } from '../depot-state/depot-list-store';
import { SectionIntro } from '../sections/section-intro';
import { BillTable } from './bill-table';
import { CostsApi } from './costs-api';
import { addDays } from '@nightyard/contracts/depot-time';
import { addMonths, instantAt, kw, kwh, mediumDay, money, monthKey, periodLabel } from './costs-format';
import { EmissionsCard } from './emissions-card';
import { MeterImportPanel } from './meter-import-panel';
import { NightsChart } from './nights-chart';
import { NightsTable } from './nights-table';

/** Who may import meter data (the API's editors); finance, admin, supervisors and facilities read. */

const PEAK_SOURCE: Record<MonthCosts['peaks']['facility']['source'], string> = {
  actual: 'from meter data',
  planned: 'in a published plan',
  entered: 'entered under Depot (peaks so far)',
  forecast: 'in the forecast of a night without a published plan',
  building: "by the building's own load (no charging then)",
};

/**
 * Why the target is where it is when no night left sets it: each target stands at its floor, the
 * peak so far or, for the facility, a demand ratchet's minimum (not a peak of this period: it is
 * named, or the target would read as a peak so far the card beside it does not show).
 */
export function floorsWhy(t: NonNullable<MonthCosts['target']>, peaks: MonthCosts['peaks']): string {
  const floors = t.targets.map((x) => {
    const r = t.ratchet;
    if (x.name === 'facility' && r && Math.abs(x.peakSoFarKw - r.kw) < 1e-6)
      return `facility ${kw(x.kw)}, the demand ratchet's minimum (${r.percent} % of ${kw(r.baseKw)}, ${r.source})`;
    const soFar = x.name === 'facility' ? peaks.facility.kw : peaks.periods.find((p) => p.name === x.name)?.kw;
    // Above the peak so far: the peak the night under way is still to draw as it was published.
    const why =
      soFar !== undefined && x.kw > soFar + 0.05 ? "the peak tonight's published plan still draws" : 'the peak so far';
    return `${x.name === 'facility' ? 'facility' : x.name} ${kw(x.kw)}, ${why}`;
  });
  return `No night left needs more than is billed already, so each target is its floor: ${floors.join('; ')}.`;
}

/**
 * The Costs section: one billing period's projected bill, month to date, savings against
 * the baselines (charge on arrival, timer), peaks so far, the nights (chart and table), diesel and CO2 avoided, and
 * the import of the utility's interval data.
 */
@Component({
  selector: 'ny-costs-page',
  imports: [
    BillTable,
    EmissionsCard,
    MatButtonModule,
    MatButtonToggleModule,
    MatFormFieldModule,
    MatIconModule,
    MatProgressBarModule,
    MatSelectModule,
    MeterImportPanel,
    NightsChart,
    NightsTable,
    RouterLink,
    SectionIntro,
  ],
  templateUrl: './costs-page.html',
  styleUrls: ['./costs-panels.scss', './costs-page.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class CostsPage {
  private readonly api = inject(CostsApi);
  private readonly auth = inject(AuthStore);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);
  protected readonly depots = inject(DepotListStore);
  private readonly clock = inject(Clock);

  /** `?date=YYYY-MM-DD`: a day of the billing period to show (default: today at the depot). */
  readonly date = input<string>();

  protected readonly canImport = computed(() => hasAnyRole(this.auth.roles(), COST_EDITORS));
  protected readonly depot = this.depots.current;
  protected readonly timezone = computed(() => this.depot()?.timezone ?? 'UTC');
  protected readonly today = computed(() => this.clock.todayAt(this.timezone()));
  /** The day asked for: the address's date, else today at the depot. */
  protected readonly requested = computed(() => {
    const d = this.date();
    return d && ISO_DATE.test(d) ? d : this.today();
  });

  private readonly loaded = resource({
    params: () => {
      const depotId = this.depot()?.id;
      const date = this.requested();
      return depotId ? { depotId, date } : undefined;
    },
    loader: ({ params }) => this.api.month(params.depotId, params.date),
  });
  /** The period shown: kept while the next one loads, none after a failure. */
  protected readonly month = linkedSignal<{ status: string; value: MonthCosts | undefined }, MonthCosts | null>({
    source: () => ({ status: this.loaded.status(), value: this.loaded.hasValue() ? this.loaded.value() : undefined }),
    computation: (s, previous) => s.value ?? (s.status === 'error' ? null : (previous?.value ?? null)),
  });
  protected readonly loading = this.loaded.isLoading;
  protected readonly problem = computed(() => {
    const err = this.loaded.error();
    return err ? toApiProblem(err).message : null;
  });
  /** The first day of a billing period seen, so the selector can list the periods around today. */
  private readonly anchor = linkedSignal<MonthCosts | null, string | null>({
    source: this.month,
    computation: (m, previous) => previous?.value ?? m?.period.start ?? null,
  });
  protected readonly billView = signal<'projected' | 'toDate'>('projected');

  protected readonly periodName = computed(() => {
    const m = this.month();
    return m ? periodLabel(m.period.start, m.period.end) : '';
  });

  /** The billing periods to choose from: a year back from the one holding today, and the next one. */
  protected readonly periods = computed(() => {
    const anchor = this.anchor();
    if (!anchor) return [];
    const today = this.today();
    let current = anchor;
    for (let i = 0; i < 240 && current > today; i++) current = addMonths(current, -1);
    for (let i = 0; i < 240 && addMonths(current, 1) <= today; i++) current = addMonths(current, 1);
    const starts = Array.from({ length: 14 }, (_, k) => addMonths(current, 1 - k));
    const shown = this.month()?.period.start;
    if (shown && !starts.includes(shown)) starts.push(shown);
    return starts
      .sort((a, b) => b.localeCompare(a))
      .map((start) => ({
        start,
        label: `${periodLabel(start, addMonths(start, 1))}${start === current ? ' (current)' : ''}`,
      }));
  });

  protected readonly periodFacts = computed(() => {
    const m = this.month();
    if (!m) return null;
    const today = this.today();
    const state = today < m.period.start ? 'future' : today >= m.period.end ? 'past' : 'current';
    return {
      from: mediumDay(m.period.start),
      to: mediumDay(addDays(m.period.end, -1)),
      days: m.period.days,
      state,
    };
  });

  protected readonly cards = computed(() => {
    const m = this.month();
    const facts = this.periodFacts();
    if (!m || !facts) return null;
    const c = m.currency;
    const tz = this.timezone();
    const saved = m.savings;
    // The two bills as the note shows them, each to the cent as a bill is.
    const planBill = toCents(saved.planBill);
    const baselineBill = toCents(saved.baselineBill);
    const facility = m.peaks.facility;
    const facilityAt = instantAt(facility.at, tz);
    return {
      projected: money(toCents(m.projected.total), c),
      projectedParts: (() => {
        // The parts add up to the total shown (footedCents, the one rounding rule).
        const [e, d, f] = footedCents(
          [m.projected.energyTotal, m.projected.demandTotal, m.projected.fixedTotal],
          toCents(m.projected.total),
        );
        return `Energy ${money(e!, c)}, demand ${money(d!, c)}, fixed ${money(f!, c)}`;
      })(),
      projectedRange: m.projectedRange
        ? `${m.forecast.length === 1 ? '1 night is' : `${m.forecast.length} nights are`} forecast: between ${money(m.projectedRange.low, c)} and ${money(m.projectedRange.high, c)}.`
        : null,
      toDate: money(m.monthToDate.total, c),
      toDateNote:
        facts.state === 'future'
          ? 'The period has not started.'
          : facts.state === 'past'
            ? `The whole period, ${kwh(m.monthToDate.kwh)}.`
            : `From ${facts.from} to now, ${kwh(m.monthToDate.kwh)}.`,
      // Their difference: the card and its note agree to the cent (the unrounded one can be a cent off).
      savings: money(baselineBill - planBill, c),
      savingsPositive: baselineBill > planBill,
      // The two bills are whole-period bills: the first is the projected bill shown beside it.
      savingsNote: saved.nightsCompared
        ? `Projected for the whole period: the projected bill ${money(planBill, c)} (facility demand ` +
          `${kw(saved.planPeakKw)}) against ${money(baselineBill, c)} with ` +
          `${saved.nightsCompared === 1 ? 'the published night' : `the ${saved.nightsCompared} published nights`} ` +
          `charged as ${saved.nightsCompared === 1 ? 'its baseline' : 'their baselines'} instead (facility demand ${kw(saved.baselinePeakKw)}).`
        : 'No published plan in this period to compare yet.',
      peak: kw(facility.kw),
      peakNote:
        facility.kw > 0
          ? `${facilityAt ? `Set ${facilityAt}, ` : ''}${PEAK_SOURCE[facility.source]}.`
          : 'No peak recorded yet.',
      periodPeaks: m.peaks.periods.map((p) => {
        const at = instantAt(p.at, tz);
        return `${p.name} ${kw(p.kw)}${at ? `, set ${at}` : ''}`;
      }),
    };
  });

  /** The billing period's demand target over the nights left, with why and what a kW either side is worth. */
  protected readonly target = computed(() => {
    const t = this.month()?.target;
    if (!t) return null;
    const facility = t.targets.find((x) => x.name === 'facility');
    const forecast = t.nights.filter((n) => n.basis === 'typical-weekday').length;
    return {
      headline: facility ? `Demand target ${kw(facility.kw)}` : 'Demand target',
      periods: t.targets.filter((x) => x.name !== 'facility').map((x) => `${x.name} ${kw(x.kw)}`),
      why: t.binding?.sentence ?? floorsWhy(t, this.month()!.peaks),
      marginal: t.marginal.map((m) => m.sentence),
      impossible: t.impossible.map((i) => i.sentence),
      nights:
        `Over ${t.nights.length === 1 ? '1 night' : `${t.nights.length} nights`} left in the period` +
        (forecast ? ` (${forecast === 1 ? '1 forecast' : `${forecast} forecast`} from the same weekday's runs)` : '') +
        `: energy ${money(t.cost.energy, t.currency)}, demand charges above what is billed already ${money(t.cost.demand, t.currency)}.`,
    };
  });

  protected readonly sources = computed(() => {
    const m = this.month();
    if (!m) return null;
    const s = m.sources;
    return {
      intervals:
        s.actualIntervals === 0
          ? 'none imported yet'
          : s.actualIntervals === 1
            ? '1 metered 15-minute interval'
            : `${s.actualIntervals.toLocaleString()} metered 15-minute intervals`,
      nights:
        s.plannedNights === 0
          ? 'none yet'
          : s.plannedNights === 1
            ? '1 published plan'
            : `${s.plannedNights} published plans`,
      missing: s.schoolNightsWithoutPlan,
      forecast: s.forecastNights,
      typical: m.forecast.some((n) => n.basis === 'typical-weekday'),
    };
  });

  protected readonly bill = computed(() => {
    const m = this.month();
    if (!m) return null;
    const toDate = this.billView() === 'toDate';
    const key = monthKey(m.period.start);
    return {
      bill: toDate ? m.monthToDate : m.projected,
      nowMs: toDate ? null : this.clock.tick(),
      caption: `${toDate ? 'Bill to date' : 'Projected bill'}, ${this.periodName()}`,
      fileName: `costs-bill-${toDate ? 'to-date' : 'projected'}-${key}.csv`,
    };
  });

  constructor() {
    void this.depots.load();
  }

  protected reload(): void {
    this.loaded.reload();
  }

  protected choosePeriod(start: string): void {
    this.go(start);
  }

  protected previous(): void {
    const m = this.month();
    this.go(m ? addDays(m.period.start, -1) : addMonths(this.requested(), -1));
  }

  protected next(): void {
    const m = this.month();
    this.go(m ? m.period.end : addMonths(this.requested(), 1));
  }

  private go(date: string): void {
    void this.router.navigate([], { relativeTo: this.route, queryParams: { date }, queryParamsHandling: 'merge' });
  }
}
