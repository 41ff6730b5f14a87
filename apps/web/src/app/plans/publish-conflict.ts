import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';

/** Publishing was refused because someone else published for the night meanwhile: reload or compare. */
@Component({
  selector: 'ny-publish-conflict',
  imports: [MatButtonModule, MatIconModule],
  template: `
    <mat-icon aria-hidden="true">sync_problem</mat-icon>
    <div>
      <p class="strong">Not published: someone else published a plan for this night.</p>
      <p>{{ message() }}</p>
      <div class="actions">
        <button mat-stroked-button type="button" (click)="reload.emit(false)">Reload versions</button>
        <button mat-stroked-button type="button" (click)="reload.emit(true)">Compare with the published version</button>
      </div>
    </div>
  `,
  styleUrl: './publish-conflict.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'conflict', role: 'alert' },
})
export class PublishConflict {
  /** The API's words: who published which version, when. */
  readonly message = input.required<string>();
  /** Reload the versions; `true` to compare the chosen one with the published one then. */
  readonly reload = output<boolean>();
}
