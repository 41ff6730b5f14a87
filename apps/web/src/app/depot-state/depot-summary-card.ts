import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import type { DepotSummary } from '@nightyard/contracts';
import { formatClock, formatKw, formatServiceDay } from './depot-format';

/** The depot at a glance, from GET /api/depots. Shared by every section page. */
@Component({
  selector: 'ny-depot-summary-card',
  imports: [MatCardModule, MatIconModule],
  templateUrl: './depot-summary-card.html',
  styleUrl: './depot-summary-card.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { '[class.prominent]': 'prominent()' },
})
export class DepotSummaryCard {
  readonly depot = input.required<DepotSummary>();
  /** Larger type, for the page where the depot is the main content (Tonight). */
  readonly prominent = input(false);

  protected readonly headingId = `ny-depot-${Math.random().toString(36).slice(2, 9)}`;
  protected readonly serviceLimit = computed(() => formatKw(this.depot().serviceLimitKw));
  protected readonly outOfService = computed(() => this.depot().chargerCount - this.depot().chargersInService);
  protected readonly serviceDay = computed(() => {
    const day = this.depot().nextServiceDay;
    if (!day) return null;
    const tz = this.depot().timezone;
    return {
      date: formatServiceDay(day.date),
      firstPullOut: formatClock(day.firstPullOut, tz),
      lastPullOut: formatClock(day.lastPullOut, tz),
      busesOut: day.busesOut,
      absent: absentNote(day.absentBuses),
    };
  });
}

/** "bus 220 absent tonight", "buses 213, 220 absent tonight", or null: the yard's own words. */
function absentNote(buses: readonly string[]): string | null {
  if (buses.length === 0) return null;
  return `${buses.length === 1 ? 'bus' : 'buses'} ${buses.join(', ')} absent tonight`;
}
