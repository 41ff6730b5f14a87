/** The span a plan covers, in epoch ms: its first slot's start to its last slot's end. */
export interface PlanHorizon {
  start: number;
  end: number;
  slotMs: number;
}

const QUARTER_HOUR_MS = 15 * 60_000;

/**
 * A plan's horizon from its slots (the slot length read from the first two, 15 minutes for a
 * plan of one slot); null for a plan without slots. Plain module: the Yard and Plans timelines
 * and the API's yard steps share it.
 */
export function horizonOf(result: { slots: readonly { start: string }[] }): PlanHorizon | null {
  const first = result.slots[0];
  const last = result.slots.at(-1);
  if (!first || !last) return null;
  const start = Date.parse(first.start);
  const second = result.slots[1];
  const slotMs = second ? Date.parse(second.start) - start : QUARTER_HOUR_MS;
  return { start, end: Date.parse(last.start) + slotMs, slotMs };
}
