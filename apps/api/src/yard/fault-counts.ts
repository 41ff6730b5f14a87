import type { PlanResult } from '@nightyard/contracts';

type Moved = { buses: string[]; reasons: string[] };

/**
 * A re-plan's reasons with the buses of each charger reported out counted from the plan the yard
 * was following. The engine counts them from the plan it is given, in which the sessions on such a
 * charger were already stopped at the report (their power after it never flowed), so it read "0
 * buses were planned on it" and counted those buses among the "other buses moved". A late bus,
 * an absent one or a reading is named by the report itself (`reported`), once: the engine's own
 * lines name every one of the night's so far.
 */
export function recountFaults(
  moved: Moved,
  followed: Pick<PlanResult, 'sessions'>,
  outOfService: readonly string[],
  late: readonly string[],
  atMs: number,
  /** This report in words when it is not a charger out ("bus 220 absent tonight"): the reason it stands for. */
  reported: string | null = null,
): Moved {
  const on = new Map(
    outOfService.map((c) => [
      c,
      new Set(followed.sessions.filter((s) => s.charger === c && Date.parse(s.end) > atMs).map((s) => s.bus)),
    ]),
  );
  const forced = new Set([...late, ...[...on.values()].flatMap((buses) => [...buses])]);
  const others = moved.buses.filter((b) => !forced.has(b)).length;
  const otherBuses = `${others} other ${others === 1 ? 'bus' : 'buses'} moved`;
  const reasons = moved.reasons.flatMap((r) => {
    // The engine's account of late buses and readings covers the whole night so far: the report's own stands for them.
    if (/ running late$/.test(r) || /^battery levels reported for /.test(r)) return [];
    const fault = /^charger (.+?) out of service: \d+ (bus was|buses were) planned on it$/.exec(r);
    const buses = fault ? on.get(fault[1]!) : undefined;
    // Out already in the plan followed (reported before an earlier revision): it moved no bus now.
    if (buses?.size === 0) return [];
    if (buses)
      return [
        `charger ${fault![1]} out of service: ${buses.size} ${buses.size === 1 ? 'bus was' : 'buses were'} planned on it`,
      ];
    // No other bus moved after all: the reason for moving others goes.
    if (others === 0 && /^\d+ other bus(es)? moved to make room/.test(r)) return [];
    return [
      r.replace(/^\d+ other bus(es)? moved/, otherBuses).replace(/\(\d+ other bus(es)? moved\)$/, `(${otherBuses})`),
    ];
  });
  // The charger's buses are moved (unplugged now) whether or not the engine saw their plan change:
  // one stopped at the report inside the slot before the cut-off kept its plan from there on.
  const buses = [...new Set([...moved.buses, ...[...on.values()].flatMap((b) => [...b])])].sort();
  // Every bus moved is an "other" one: the count beside the reason only repeats the headline's
  // ("17 buses moved … (17 other buses moved)").
  const said = others === buses.length ? reasons.map((r) => r.replace(/ \(\d+ other bus(es)? moved\)$/, '')) : reasons;
  return { buses, reasons: reported ? [reported, ...said] : said };
}
