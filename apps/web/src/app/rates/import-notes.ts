import { ChangeDetectionStrategy, Component, input } from '@angular/core';

/** What the URDB import mapped and left out, to check before saving. */
@Component({
  selector: 'ny-import-notes',
  template: `
    <section class="panel import-notes" aria-labelledby="import-notes-heading">
      <h2 id="import-notes-heading">What the import mapped, and what it left out</h2>
      <p class="hint">
        From {{ fileName() }}. Nothing is saved until you press “Save rate plan”. Check each season below against the
        utility's tariff sheet.
      </p>
      <ul>
        @for (note of notes(); track $index) {
          <li>{{ note }}</li>
        }
      </ul>
    </section>
  `,
  styleUrls: ['../shared/panel.scss', './import-notes.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ImportNotes {
  readonly notes = input.required<readonly string[]>();
  readonly fileName = input<string | null>(null);
}
