import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { PlanResult } from '@nightyard/contracts';
import {
  SHORT_KWH,
  clock,
  dayClock,
  horizonOf,
  hourTicks,
  money,
  naturalCompare,
  num,
  priceBands,
  spanPct,
} from './plan-format';

/** A charger the depot has (so an idle one still gets its row). */
export interface TimelineCharger {
  id: string;
  maxKw: number | null;
}

interface Bar {
  key: string;
  bus: string;
  left: number;
  width: number;
  short: boolean;
  title: string;
}

/**
 * One row per charger across the night at the depot; each plug-in is a bar labelled by its bus,
 * over the night's price bands. The same sessions are listed in a table below the picture.
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

  private readonly horizon = computed(() => horizonOf(this.result()));
  private readonly shortBuses = computed(
    () => new Set(this.result().buses.filter((b) => b.shortfallKwh > SHORT_KWH).map((b) => b.id)),
  );

  protected readonly rows = computed(() => {
    const r = this.result();
    const h = this.horizon();
    const tz = this.timezone();
    const kw = new Map(this.chargers().map((c) => [c.id, c.maxKw]));
    const ids = [...new Set([...this.chargers().map((c) => c.id), ...r.sessions.map((s) => s.charger)])].sort(naturalCompare);
    return ids.map((id) => ({
      id,
      maxKw: kw.get(id) ?? null,
      bars: r.sessions
        .filter((s) => s.charger === id)
        .map((s, i): Bar => {
          const span = spanPct(Date.parse(s.start), Date.parse(s.end), h);
          const short = this.shortBuses().has(s.bus);
          return {
            key: `${s.bus}-${s.start}-${i}`,
            bus: s.bus,
            ...span,
            short,
            title: `Bus ${s.bus} on ${id}, ${clock(s.start, tz)}–${clock(s.end, tz)}, ${num(s.kwh)} kWh${short ? ' (leaves short)' : ''}`,
          };
        }),
    }));
  });

  protected readonly ticks = computed(() =>
    hourTicks(this.result(), this.timezone()).map((t) => ({ ...t, left: spanPct(t.at, t.at, this.horizon()).left })),
  );

  protected readonly bands = computed(() =>
    priceBands(this.result()).map((b) => ({ ...b, ...spanPct(b.start, b.end, this.horizon()) })),
  );

  protected readonly legend = computed(() => {
    const seen = new Map<string, number>();
    for (const b of this.bands()) if (!seen.has(b.level)) seen.set(b.level, b.price);
    const names = { low: 'Lowest price', mid: 'Middle price', high: 'Highest price' } as const;
    return (['low', 'mid', 'high'] as const)
      .filter((l) => seen.has(l))
      .map((l) => ({ level: l, text: `${names[l]} (${money(seen.get(l)!, this.currency(), 3)}/kWh)` }));
  });

  protected readonly summary = computed(() => {
    const r = this.result();
    const h = this.horizon();
    const tz = this.timezone();
    return `Charger timeline: ${r.sessions.length} plug-ins on ${this.rows().length} chargers from ${dayClock(new Date(h.start).toISOString(), tz)} to ${dayClock(new Date(h.end).toISOString(), tz)}. The same plug-ins are listed in the table below.`;
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
