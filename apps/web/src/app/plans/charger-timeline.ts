import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  ElementRef,
  afterNextRender,
  computed,
  inject,
  input,
  signal,
  viewChild,
} from '@angular/core';
import type { PlanResult } from '@nightyard/contracts';
import { horizonOf } from '@nightyard/contracts/plan-horizon';
import {
  NO_HORIZON,
  SHORT_KWH,
  clock,
  dayClock,
  money,
  naturalCompare,
  num,
  priceBands,
  type PriceLevel,
} from './plan-format';
import { axisTicks, placeSpan, timelineSegments } from './timeline-scale';

/** A charger the depot has (so an idle one still gets its row). */
export interface TimelineCharger {
  id: string;
  maxKw: number | null;
  /** Out of service now: shown (with its power) only where the plan uses it. */
  out?: boolean;
}

/** A span in which the charger is out of service: no bus is planned on it there. */
interface Outage {
  key: string;
  left: number;
  width: number;
  /** False when the span is too narrow for its words: the title and the phone list carry them. */
  labelled: boolean;
  time: string;
}

interface Bar {
  key: string;
  bus: string;
  left: number;
  width: number;
  short: boolean;
  /** False when the bar is too narrow for its bus number: the tooltip and the table carry it. */
  labelled: boolean;
  title: string;
  time: string;
  kwh: string;
}

/** The track's width until it is measured (the grid's minimum). */
const MIN_TRACK_PX = 640;
/** A horizon longer than this (a weekend) names the day with each time. */
const DAY_MS = 24 * 3_600_000;

/**
 * One row per charger across the night at the depot; each plug-in is a bar labelled by its bus,
 * over the night's price bands. Empty spans of two hours or more are collapsed so the width goes to
 * the hours with plug-ins; a bar too narrow for its label carries it in a tooltip and in the table
 * below. On a phone the same plug-ins read as a list per charger.
 */
@Component({
  selector: 'ny-charger-timeline',
  changeDetection: ChangeDetectionStrategy.OnPush,
  templateUrl: './charger-timeline.html',
  styleUrls: ['./table-alternative.scss', './charger-timeline.scss'],
})
export class ChargerTimeline {
  readonly result = input.required<PlanResult>();
  readonly timezone = input.required<string>();
  readonly currency = input('USD');
  readonly chargers = input<readonly TimelineCharger[]>([]);

  private readonly axis = viewChild<ElementRef<HTMLElement>>('axis');
  /** The track's width in px, measured, so labels and ticks are placed for the space they have. */
  protected readonly trackPx = signal(MIN_TRACK_PX);

  constructor() {
    const destroyRef = inject(DestroyRef);
    afterNextRender(() => {
      const el = this.axis()?.nativeElement;
      if (!el || typeof ResizeObserver === 'undefined') return;
      const ro = new ResizeObserver(() => {
        const w = el.getBoundingClientRect().width;
        if (w > 0) this.trackPx.set(w);
      });
      ro.observe(el);
      destroyRef.onDestroy(() => ro.disconnect());
    });
  }

  private readonly horizon = computed(() => horizonOf(this.result()) ?? NO_HORIZON);
  private readonly shortBuses = computed(
    () =>
      new Set(
        this.result()
          .buses.filter((b) => b.shortfallKwh > SHORT_KWH)
          .map((b) => b.id),
      ),
  );

  protected readonly segments = computed(() =>
    timelineSegments(
      this.horizon(),
      this.result().sessions.map((s) => [Date.parse(s.start), Date.parse(s.end)] as const),
    ),
  );

  /** The collapsed spans, named by their hours. */
  protected readonly gaps = computed(() => {
    const tz = this.timezone();
    return this.segments()
      .filter((s) => s.collapsed)
      .map((s) => ({
        ...s,
        text: `${clock(new Date(s.start).toISOString(), tz)}–${clock(new Date(s.end).toISOString(), tz)} no plug-in (shortened)`,
      }));
  });

  protected readonly rows = computed(() => {
    const r = this.result();
    const tz = this.timezone();
    const segs = this.segments();
    const px = this.trackPx();
    const kw = new Map(this.chargers().map((c) => [c.id, c.maxKw]));
    const days = segs.length > 0 && segs.at(-1)!.end - segs[0]!.start > DAY_MS;
    const at = days ? dayClock : clock;
    const shown = this.chargers().filter((c) => !c.out);
    const outages = r.outOfService ?? [];
    const ids = [
      ...new Set([...shown.map((c) => c.id), ...r.sessions.map((s) => s.charger), ...outages.map((o) => o.charger)]),
    ].sort(naturalCompare);
    return ids.map((id) => ({
      id,
      maxKw: kw.get(id) ?? null,
      outages: outages
        .filter((o) => o.charger === id)
        .map((o): Outage => {
          const span = placeSpan(segs, Date.parse(o.from), Date.parse(o.to));
          return {
            key: o.from,
            ...span,
            labelled: (span.width / 100) * px >= 110,
            time: `${at(o.from, tz)}–${at(o.to, tz)}`,
          };
        }),
      bars: r.sessions
        .filter((s) => s.charger === id)
        .sort((a, b) => a.start.localeCompare(b.start))
        .map((s, i): Bar => {
          const span = placeSpan(segs, Date.parse(s.start), Date.parse(s.end));
          const short = this.shortBuses().has(s.bus);
          // Over a weekend the same hour comes round more than once: the day goes with it.
          const time = `${at(s.start, tz)}–${at(s.end, tz)}`;
          return {
            key: `${s.bus}-${s.start}-${i}`,
            bus: s.bus,
            ...span,
            short,
            labelled: (span.width / 100) * px >= s.bus.length * 8 + 10,
            title: `Bus ${s.bus} on ${id}, ${time}, ${num(s.kwh)} kWh${short ? ' (leaves short)' : ''}`,
            time,
            kwh: num(s.kwh),
          };
        }),
    }));
  });

  protected readonly anyOutage = computed(() => this.rows().some((r) => r.outages.length > 0));

  /** Plug-ins too short to carry their bus number on the picture. */
  protected readonly unlabelled = computed(() =>
    this.rows().reduce((n, r) => n + r.bars.filter((b) => !b.labelled).length, 0),
  );

  protected readonly ticks = computed(() => axisTicks(this.segments(), this.timezone(), this.trackPx()));

  protected readonly bands = computed(() =>
    priceBands(this.result()).map((b) => ({ ...b, ...placeSpan(this.segments(), b.start, b.end) })),
  );

  /**
   * The night's prices, cheapest first, each named by its tariff period as Rates names it
   * ("on-peak: $0.280 per kWh"); plans made before slots carried the period rank them instead.
   */
  protected readonly legend = computed(() => {
    const ranks = { low: 'Lowest price', mid: 'Middle price', high: 'Highest price' } as const;
    const seen = new Map<string, { level: PriceLevel; price: number; text: string }>();
    for (const b of this.bands()) {
      const name = b.period ?? ranks[b.level];
      const text = `${name}: ${money(b.price, this.currency(), 3)} per kWh`;
      if (!seen.has(text)) seen.set(text, { level: b.level, price: b.price, text });
    }
    return [...seen.values()].sort((a, b) => a.price - b.price || a.text.localeCompare(b.text));
  });

  protected readonly summary = computed(() => {
    const r = this.result();
    const h = this.horizon();
    const tz = this.timezone();
    const gaps = this.gaps().length
      ? ` Hours without a plug-in are shortened: ${this.gaps()
          .map((g) => g.text.replace(' no plug-in (shortened)', ''))
          .join(', ')}.`
      : '';
    const outages = this.rows()
      .flatMap((row) => row.outages.map((o) => `${row.id} out of service ${o.time}`))
      .join(', ');
    return `Charger timeline: ${r.sessions.length} plug-ins on ${this.rows().length} chargers from ${dayClock(new Date(h.start).toISOString(), tz)} to ${dayClock(new Date(h.end).toISOString(), tz)}.${outages ? ` ${outages}.` : ''}${gaps} The same plug-ins are listed in the table below.`;
  });

  protected readonly sessions = computed(() => {
    const tz = this.timezone();
    return [...this.result().sessions]
      .sort((a, b) => naturalCompare(a.charger, b.charger) || a.start.localeCompare(b.start))
      .map((s) => ({
        charger: s.charger,
        bus: s.bus,
        start: dayClock(s.start, tz),
        end: dayClock(s.end, tz),
        kwh: num(s.kwh),
        peakKw: num(Math.max(0, ...s.kw)),
        short: this.shortBuses().has(s.bus),
      }));
  });
}
