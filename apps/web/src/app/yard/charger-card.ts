import { ChangeDetectionStrategy, Component, computed, input, output, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { CONFIRM_EARLY_MS } from '@nightyard/contracts';
import { NightTrack } from './night-track';
import { OverdueStep, type ConfirmAt } from './overdue-step';
import type { ReportPreset } from './report-dialog';
import { atOdds, clock, dueText, kwh, moveBy, relative, type Horizon, type StepView } from './yard-format';
import type { ChargerView } from './yard-store';

const STATE_TEXT = {
  done: 'Done',
  saving: 'Saving…',
  overdue: 'Overdue',
  upcoming: 'Upcoming',
  missed: 'Did not happen',
} as const;
const STATE_ICON = {
  done: 'check_circle',
  saving: 'cloud_upload',
  overdue: 'warning',
  upcoming: 'schedule',
  missed: 'block',
} as const;

/**
 * A charger as the yard works it: live state, the step due now (or next) in big type, the overdue
 * steps apart (each confirmed with its real time or said not to have happened), the night, all steps.
 */
@Component({
  selector: 'ny-charger-card',
  imports: [MatButtonModule, MatIconModule, NightTrack, OverdueStep],
  templateUrl: './charger-card.html',
  styleUrl: './charger-card.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: {
    role: 'region',
    '[attr.aria-labelledby]': 'headingId()',
    '[attr.data-charger]': 'view().label',
    '[class.out]': 'view().outOfService',
  },
})
export class ChargerCard {
  readonly view = input.required<ChargerView>();
  readonly horizon = input.required<Horizon>();
  readonly now = input.required<number>();
  readonly timezone = input.required<string>();
  /** Steps being reported as not done (the server is re-planning). */
  readonly missing = input<ReadonlySet<string>>(new Set());

  readonly confirm = output<StepView>();
  readonly confirmAt = output<ConfirmAt>();
  readonly missed = output<StepView>();
  readonly report = output<ReportPreset>();

  /** The step whose early confirmation is being asked about (its key), else null. */
  protected readonly askingEarly = signal<string | null>(null);

  protected readonly stateText = STATE_TEXT;
  protected readonly stateIcon = STATE_ICON;
  protected readonly headingId = computed(() => `ny-charger-${this.view().label.replace(/[^\w-]/g, '_')}`);

  protected readonly next = computed(() => {
    const v = this.view().next;
    if (!v) return null;
    return {
      view: v,
      urgent: v.reason !== null,
      when: dueText(v, this.now()),
      // A plug-in cut short (its charger reported out) may have had no charging planned yet:
      // "After 0 kWh planned" read as if the bus had not charged.
      energy:
        v.step.action === 'connect'
          ? `${kwh(v.step.kwh)} planned for this plug-in`
          : v.step.kwh < 0.05
            ? 'No charging planned in this plug-in'
            : `After ${kwh(v.step.kwh)} planned`,
      // Who makes the move, in the run sheet's words: a driver's step is not the crew's walk.
      by: moveBy(v.step),
      button: v.step.action === 'connect' ? 'Confirm plugged in' : 'Confirm unplugged',
      // Asked once more before it is saved: a step more than an hour ahead (see CONFIRM_EARLY_MS),
      // or an unplug whose plug-in nobody confirmed (the two are saved in the order they happened,
      // and a re-plan reads them so).
      early:
        Date.parse(v.step.at) - this.now() > CONFIRM_EARLY_MS
          ? `This step is due ${v.time}, ${relative(Date.parse(v.step.at), this.now())}. Was it really done now?`
          : unconfirmedPlugIn(v, this.view().overdue),
      label: `${v.step.action === 'connect' ? 'Confirm plugged in' : 'Confirm unplugged'}: bus ${v.step.bus} ${v.step.action === 'connect' ? 'at' : 'from'} charger ${v.step.charger}`,
    };
  });

  /** The last step confirmed on this charger, with whether the server has it yet. */
  protected confirmNext(view: StepView, early: string | null): void {
    if (early && this.askingEarly() !== view.step.key) {
      this.askingEarly.set(view.step.key);
      return;
    }
    this.askingEarly.set(null);
    this.confirm.emit(view);
  }

  protected readonly lastDone = computed(() => {
    const done = this.view().steps.filter((s) => s.state === 'done' || s.state === 'saving');
    const last = done.filter((s) => s.outbox).at(-1) ?? done.at(-1);
    if (!last) return null;
    const box = last.outbox;
    let status: string;
    let icon: string;
    if (box?.state === 'saving') {
      status = box.message ?? 'Saving…';
      icon = box.retrying ? 'sync_problem' : 'cloud_upload';
    } else {
      status = last.doneNote ? `Saved. ${last.doneNote}` : 'Saved';
      icon = 'cloud_done';
    }
    return { title: last.title, status, icon, saving: box?.state === 'saving' };
  });

  protected readonly failed = computed(() =>
    this.view()
      .steps.filter((s) => s.outbox?.state === 'failed')
      .map((s) => ({ key: s.step.key, title: s.title, message: s.outbox?.state === 'failed' ? s.outbox.message : '' })),
  );

  protected readonly counts = computed(() => {
    const steps = this.view().steps;
    return {
      total: steps.length,
      done: steps.filter((s) => s.state === 'done' || s.state === 'saving').length,
      overdue: steps.filter((s) => s.state === 'overdue').length,
      missed: steps.filter((s) => s.state === 'missed').length,
    };
  });

  protected readonly live = computed(() => this.view().live);
  /** The charger's report against the last step confirmed on it, where they disagree. */
  protected readonly atOdds = computed(() =>
    this.view().outOfService ? null : atOdds(this.view().steps, this.view().charger?.live, this.timezone()),
  );
  protected readonly maxKw = computed(() => this.view().charger?.maxKw ?? null);

  protected reportFault(): void {
    const v = this.view();
    this.report.emit({
      kind: 'charger_out',
      charger: v.label,
      reason: `The charger reported a fault${v.charger?.live?.seenAt ? ` at ${clock(v.charger.live.seenAt, this.timezone())}` : ''}`,
    });
  }

  protected reportProblem(): void {
    const v = this.view();
    this.report.emit({ charger: v.label, bus: v.next?.step.bus });
  }
}

/** The question before an unplug whose plug-in is still among the overdue steps, or null. */
function unconfirmedPlugIn(v: StepView, overdue: readonly StepView[]): string | null {
  if (v.step.action !== 'disconnect') return null;
  const plugIn = overdue.find(
    (o) => o.step.action === 'connect' && o.step.bus === v.step.bus && o.step.charger === v.step.charger,
  );
  return plugIn
    ? `Bus ${v.step.bus}'s plug-in on ${v.step.charger} (due ${plugIn.time}) is not confirmed: confirm it below with the time it happened first. Was bus ${v.step.bus} really unplugged from ${v.step.charger} now?`
    : null;
}
