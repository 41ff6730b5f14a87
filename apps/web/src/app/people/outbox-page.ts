import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatExpansionModule } from '@angular/material/expansion';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { OutboxMessage } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { DepotTimeNote, VIEWER_TIME_ZONE } from '../core/depot-time-note';
import { DepotListStore } from '../depot-state/depot-list-store';
import { PeopleApi } from './people-api';
import { formatWhen } from './people-format';
import { textWithLinks, type TextPart } from './text-with-links';

interface ShownMessage {
  message: OutboxMessage;
  when: string;
  parts: TextPart[];
}

/** Development only: the e-mails the local fake mail server caught. */
@Component({
  selector: 'ny-outbox-page',
  imports: [DepotTimeNote, MatButtonModule, MatExpansionModule, MatIconModule, MatProgressBarModule, RouterLink],
  templateUrl: './outbox-page.html',
  styleUrl: './outbox-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class OutboxPage {
  private readonly api = inject(PeopleApi);
  private readonly depots = inject(DepotListStore);
  private readonly viewerZone = inject(VIEWER_TIME_ZONE);
  /** Times at the depot, as everywhere (the shell has loaded the depots). */
  protected readonly zone = computed(() => this.depots.current()?.timezone ?? this.viewerZone);

  protected readonly messages = signal<OutboxMessage[]>([]);
  protected readonly state = signal<'loading' | 'loaded' | 'absent' | 'failed'>('loading');
  protected readonly problem = signal<string | null>(null);
  protected readonly shown = computed<ShownMessage[]>(() =>
    this.messages().map((message) => ({
      message,
      // The app's own date for the message (its clock), as every other time it shows.
      when: formatWhen(message.sentAt ?? message.receivedAt, this.zone()) ?? message.receivedAt,
      parts: textWithLinks(message.text),
    })),
  );

  constructor() {
    void this.load();
  }

  protected async load(): Promise<void> {
    this.state.set('loading');
    this.problem.set(null);
    try {
      this.messages.set(await this.api.outbox());
      this.state.set('loaded');
    } catch (err) {
      const p = toApiProblem(err);
      if (p.status === 404) {
        this.state.set('absent');
      } else {
        this.problem.set(p.message);
        this.state.set('failed');
      }
    }
  }
}
