import { weekdayAt } from '@nightyard/contracts/depot-time';
import { clock } from './plan-format';

const HOUR = 3_600_000;

/** A stretch of the night on the timeline: shown to scale, or a collapsed span with no plug-in. */
export interface Segment {
  start: number;
  end: number;
  collapsed: boolean;
  /** Where it sits on the track, in % of its width. */
  left: number;
  width: number;
}

/** Spans without a plug-in at least this long are collapsed. */
export const COLLAPSE_MS = 2 * HOUR;
/** A collapsed span takes the width of this much time. */
const COLLAPSED_WEIGHT_MS = 0.75 * HOUR;

/**
 * The night cut into segments: the hours with a plug-in (rounded out to whole hours) to scale, and
 * every empty span of two hours or more collapsed to a narrow gap, so the picture spends its width
 * on the hours that matter.
 */
export function timelineSegments(
  h: { start: number; end: number },
  busy: readonly (readonly [number, number])[],
): Segment[] {
  const spans = [...busy].filter(([a, b]) => b > h.start && a < h.end).sort((x, y) => x[0] - y[0]);
  const gaps: [number, number][] = [];
  let cursor = h.start;
  for (const [a, b] of spans) {
    const from = Math.ceil(cursor / HOUR) * HOUR;
    const to = Math.floor(a / HOUR) * HOUR;
    if (to - from >= COLLAPSE_MS) gaps.push([Math.max(from, h.start), to]);
    cursor = Math.max(cursor, b);
  }
  const tailFrom = Math.ceil(cursor / HOUR) * HOUR;
  if (spans.length && h.end - tailFrom >= COLLAPSE_MS) gaps.push([tailFrom, h.end]);

  const raw: Omit<Segment, 'left' | 'width'>[] = [];
  let at = h.start;
  for (const [a, b] of gaps) {
    if (a > at) raw.push({ start: at, end: a, collapsed: false });
    raw.push({ start: a, end: b, collapsed: true });
    at = b;
  }
  if (at < h.end) raw.push({ start: at, end: h.end, collapsed: false });
  const weight = (s: Omit<Segment, 'left' | 'width'>) => (s.collapsed ? COLLAPSED_WEIGHT_MS : s.end - s.start);
  const total = raw.reduce((sum, s) => sum + weight(s), 0) || 1;
  let left = 0;
  return raw.map((s) => {
    const width = (weight(s) / total) * 100;
    const seg = { ...s, left, width };
    left += width;
    return seg;
  });
}

/** Where an instant sits on the track (% of its width); inside a collapsed span, in proportion. */
export function placeAt(segments: readonly Segment[], t: number): number {
  if (!segments.length) return 0;
  if (t <= segments[0]!.start) return 0;
  for (const s of segments) {
    if (t <= s.end) return s.left + (s.end > s.start ? ((t - s.start) / (s.end - s.start)) * s.width : 0);
  }
  return 100;
}

/** A span [from, to) on the track, in % (clamped to it). */
export function placeSpan(segments: readonly Segment[], from: number, to: number): { left: number; width: number } {
  const left = placeAt(segments, from);
  return { left, width: Math.max(0, placeAt(segments, to) - left) };
}

/** The smallest distance between two axis marks, in px. */
export const TICK_GAP_PX = 48;
/** The width of an axis label ("00:00" is about 34 px) with room either side. */
const LABEL_PX = 40;

export interface AxisTick {
  at: number;
  left: number;
  label: string;
  /** A label at an edge of the track is aligned to it instead of centred, so it is never cut. */
  edge: 'start' | 'end' | null;
}

/**
 * Axis marks on whole hours at the depot, in the segments shown to scale, every 1, 2, 3, 4 or 6
 * hours as the width allows; a mark whose label would touch the one before it is dropped, so
 * labels never collide. On a horizon longer than a day (a weekend), midnight is marked by the day
 * it begins ("Sat"), since 18:00 and 06:00 come round more than once.
 */
export function axisTicks(segments: readonly Segment[], timeZone: string, widthPx: number): AxisTick[] {
  const width = Math.max(widthPx, 1);
  const shown = segments.filter((s) => !s.collapsed);
  const shownMs = shown.reduce((sum, s) => sum + (s.end - s.start), 0);
  const shownPct = shown.reduce((sum, s) => sum + s.width, 0);
  const pxPerHour = shownMs > 0 ? ((shownPct / 100) * width) / (shownMs / HOUR) : width;
  const step = [1, 2, 3, 4, 6].find((n) => n * pxPerHour >= TICK_GAP_PX) ?? 6;
  const days = segments.length > 0 && segments.at(-1)!.end - segments[0]!.start > 24 * HOUR;
  const out: (AxisTick & { from: number; to: number })[] = [];
  for (const s of shown) {
    for (let t = Math.ceil(s.start / HOUR) * HOUR; t <= s.end; t += HOUR) {
      const time = clock(new Date(t).toISOString(), timeZone);
      const [hh, mm] = time.split(':').map(Number);
      if (mm !== 0 || (hh ?? 0) % step !== 0) continue;
      const label = days && hh === 0 ? weekdayAt(t, timeZone) : time;
      const left = placeAt(segments, t);
      const x = (left / 100) * width;
      const edge = x < LABEL_PX / 2 ? 'start' : x > width - LABEL_PX / 2 ? 'end' : null;
      const from = edge === 'start' ? x : edge === 'end' ? x - LABEL_PX : x - LABEL_PX / 2;
      const last = out.at(-1);
      if (last && last.at === t) continue;
      if (last && from < last.to + 4) {
        // The label at the axis's start edge gives way to the next whole step (it hangs to the
        // right of its mark, so keeping it dropped that step: 16:00, 18:00, 19:00...).
        if (last.edge !== 'start' || out.length > 1) continue;
        out.pop();
      }
      out.push({ at: t, left, label, edge, from, to: from + LABEL_PX });
    }
  }
  return out.map(({ from: _f, to: _t, ...t }) => t);
}
