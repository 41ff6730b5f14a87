import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { PlanResult } from '@nightyard/contracts';
import { money } from './plan-format';

/**
 * What the plan asks of the yard crew, in a line or two: its crew moves, what fewer moves cost
 * ("2 fewer moves for $1.80"), and for a re-plan how many buses moved, why, and what keeping the
 * rest of the night costs.
 */
@Component({
  selector: 'ny-crew-moves-note',
  template: `
    @if (lines().length) {
      <ul class="crew-moves-note" aria-label="Yard crew">
        @for (line of lines(); track line) {
          <li>{{ line }}</li>
        }
      </ul>
    }
  `,
  styles: `
    .crew-moves-note {
      margin: 0 0 12px;
      padding-left: 20px;
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CrewMovesNote {
  readonly result = input.required<PlanResult>();
  readonly currency = input('USD');

  protected readonly lines = computed(() => crewMovesLines(this.result(), this.currency()));
}

/** The note's lines (empty for plans made before the crew rules). */
export function crewMovesLines(r: PlanResult, currency: string): string[] {
  const out: string[] = [];
  if (typeof r.crewMoves === 'number') {
    const by = (who: 'driver' | 'crew') =>
      r.sessions.filter((s) => s.startMove === who).length + r.sessions.filter((s) => s.endMove === who).length;
    const drivers = by('driver');
    // A plan made from a cut-off holds the whole night's sessions, but the engine counted the crew's
    // moves from the cut-off on only ("6 crew moves; 23 by drivers" beside 25 crew steps on the run
    // sheet): both counts are the night's, from its sessions.
    const crew = r.replan ? by('crew') : r.crewMoves;
    out.push(
      `${crew} crew ${crew === 1 ? 'move' : 'moves'}; ${drivers === 1 ? '1 plug-in or unplug by a driver' : `${drivers} plug-ins and unplugs by drivers`} on pulling in or out.`,
    );
  }
  if (r.crewTrade && r.crewTrade.fewerMoves > 0) {
    const n = r.crewTrade.fewerMoves;
    out.push(
      r.crewTrade.extraCost > 0.005
        ? `${n} fewer ${n === 1 ? 'move' : 'moves'} for ${money(r.crewTrade.extraCost, currency)} than the cheapest plan found.`
        : `${n} fewer ${n === 1 ? 'move' : 'moves'} than the cheapest plan found, at the same cost.`,
    );
  }
  const moved = r.replan?.moved;
  if (moved) {
    const n = moved.buses.length;
    // No bus moved: "0 buses moved because bus 204 running late" read as if the lateness moved none.
    out.push(
      n
        ? `Re-plan: ${n} ${n === 1 ? 'bus' : 'buses'} moved (${moved.buses.join(', ')})${moved.reasons.length ? ` because ${moved.reasons.join('; ')}` : ''}.`
        : `Re-plan${moved.reasons.length ? ` for ${moved.reasons.join('; ')}` : ''}: no bus moved.`,
    );
  }
  // A night planned again while a plan of it is published: what changed against that version.
  if (!moved && r.moved && r.keptFrom) {
    const n = r.moved.buses.length;
    out.push(
      n
        ? `Against version ${r.keptFrom.version} as published: ${n} ${n === 1 ? 'bus' : 'buses'} changed (${r.moved.buses.join(', ')}) because ${r.moved.reasons.join('; ')}.`
        : `Against version ${r.keptFrom.version} as published: no bus changed.`,
    );
  }
  // The trade the re-plan made to keep the night as it was (within the depot's tolerance).
  if ((moved || r.keptFrom) && r.keptPrevious) {
    const { extraCost, extraShortKwh = 0 } = r.keptPrevious;
    const kept = moved ? 'the rest of the plan being carried out' : 'the published plan';
    const short =
      extraShortKwh >= 0.05
        ? ` It leaves ${extraShortKwh.toFixed(1)} kWh short that the cheapest plan would serve by moving other buses; ${moved ? 'the plan being carried out' : 'the published plan'} left it short already.`
        : '';
    out.push(
      (extraCost > 0.005
        ? `Keeping ${kept} costs ${money(extraCost, currency)} more than the cheapest plan found.`
        : `Keeping ${kept} costs no more than the cheapest plan found.`) + short,
    );
  }
  return out;
}
