import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { YardSession } from '@nightyard/contracts';
import { weekdayTimeAt } from '@nightyard/contracts/depot-time';
import { clock, hourTicks, nowLinePct, pct, spansDays, type Horizon } from './yard-format';

/**
 * One charger's plug-ins across the night as bars labelled by bus, with hour ticks and the
 * now-line. The card's list of steps says the same in words.
 */
@Component({
  selector: 'ny-night-track',
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <div class="track" role="img" [attr.aria-label]="summary()">
      @for (t of ticks(); track t.at) {
        <span class="gridline" [style.left.%]="t.left"></span>
        <span class="tick" [style.left.%]="t.left">{{ t.label }}</span>
      }
      @for (b of bars(); track b.key) {
        <span
          class="bar"
          [class.past]="b.past"
          [class.narrow]="b.width < 9"
          [style.left.%]="b.left"
          [style.width.%]="b.width"
          [attr.data-session]="b.bus"
          [attr.data-start]="b.start"
          [attr.data-end]="b.end"
          [attr.title]="b.title"
          >{{ b.width < 9 ? '' : b.bus }}</span
        >
      }
      @if (nowLeft() !== null) {
        <span class="now" [style.left.%]="nowLeft()">
          <span class="now-label" [class.start]="nowLeft()! < 12" [class.end]="nowLeft()! > 88">{{ nowLabel() }}</span>
        </span>
      }
    </div>
  `,
  styles: `
    :host {
      display: block;
      padding-bottom: 18px;
    }
    .track {
      position: relative;
      height: 44px;
      margin: 22px 0 4px;
      border-radius: var(--mat-sys-corner-extra-small);
      background: var(--mat-sys-surface-container-highest);
    }
    .gridline {
      position: absolute;
      top: 0;
      bottom: 0;
      width: 1px;
      background: var(--mat-sys-outline-variant);
    }
    .tick {
      position: absolute;
      top: -20px;
      transform: translateX(-50%);
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-label-small);
      white-space: nowrap;
    }
    .bar {
      position: absolute;
      top: 4px;
      bottom: 4px;
      box-sizing: border-box;
      min-width: 3px;
      overflow: hidden;
      padding: 0 4px;
      border-radius: var(--mat-sys-corner-extra-small);
      background: var(--mat-sys-primary);
      color: var(--mat-sys-on-primary);
      font: var(--mat-sys-label-large);
      line-height: 36px;
      white-space: nowrap;
    }
    .bar.narrow {
      padding: 0;
    }
    .bar.past {
      border: 1px solid var(--mat-sys-outline);
      background: var(--mat-sys-outline-variant);
      color: var(--mat-sys-on-surface);
    }
    .now {
      position: absolute;
      top: -6px;
      bottom: -6px;
      width: 3px;
      margin-left: -1px;
      background: var(--mat-sys-tertiary);
      border-radius: 2px;
    }
    .now-label {
      position: absolute;
      bottom: -18px;
      left: 50%;
      transform: translateX(-50%);
      padding: 0 4px;
      border-radius: var(--mat-sys-corner-extra-small);
      background: var(--mat-sys-tertiary);
      color: var(--mat-sys-on-tertiary);
      font: var(--mat-sys-label-small);
      font-weight: 700;
      white-space: nowrap;
    }
    .now-label.start {
      left: -1px;
      transform: none;
    }
    .now-label.end {
      left: auto;
      right: -1px;
      transform: none;
    }
  `,
})
export class NightTrack {
  readonly charger = input.required<string>();
  readonly sessions = input.required<readonly YardSession[]>();
  readonly horizon = input.required<Horizon>();
  readonly now = input.required<number>();
  readonly timezone = input.required<string>();

  protected readonly ticks = computed(() =>
    hourTicks(this.horizon(), this.timezone()).filter((t) => t.left > 4 && t.left < 96),
  );
  protected readonly nowLeft = computed(() => nowLinePct(this.now(), this.horizon()));
  protected readonly nowLabel = computed(() => `Now ${clock(this.now(), this.timezone())}`);

  /** Times with their day on a night longer than a day. */
  private readonly at = computed(() => (spansDays(this.horizon()) ? weekdayTimeAt : clock));

  protected readonly bars = computed(() => {
    const h = this.horizon();
    const tz = this.timezone();
    const at = this.at();
    return this.sessions().map((s, i) => {
      const start = Date.parse(s.start);
      const end = Date.parse(s.end);
      const left = pct(start, h);
      return {
        key: `${s.bus}|${s.start}|${i}`,
        bus: s.bus,
        start: s.start,
        end: s.end,
        left,
        width: Math.max(0.6, pct(end, h) - left),
        past: end <= this.now(),
        title: `Bus ${s.bus}, ${at(start, tz)}–${at(end, tz)}`,
      };
    });
  });

  protected readonly summary = computed(() => {
    const tz = this.timezone();
    const h = this.horizon();
    const at = this.at();
    const list = this.sessions().map((s) => `bus ${s.bus} ${at(s.start, tz)} to ${at(s.end, tz)}`);
    const span = `from ${at(h.start, tz)} to ${at(h.end, tz)}`;
    const now = this.nowLeft() !== null ? ` Now ${clock(this.now(), tz)}.` : '';
    return `Charger ${this.charger()} ${span}: ${list.length ? list.join(', ') : 'no bus planned'}.${now}`;
  });
}
