import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { ROLES, ROLE_LABELS } from '@nightyard/contracts';
import type { RoleGroup } from './role-form';

let nextId = 0;

/** The roles as a labelled group of checkboxes, with the "at least one" message. */
@Component({
  selector: 'ny-role-checkboxes',
  imports: [MatCheckboxModule, ReactiveFormsModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <fieldset [formGroup]="group()" [attr.aria-describedby]="showError() ? errorId : null">
      <legend>Roles</legend>
      <div class="boxes">
        @for (role of roles; track role) {
          <mat-checkbox [formControlName]="role">{{ labels[role] }}</mat-checkbox>
        }
      </div>
      <p class="ny-form-error" [id]="errorId" aria-live="polite">
        @if (showError()) {
          {{ group().getError('server') ?? 'Choose at least one role' }}
        }
      </p>
    </fieldset>
  `,
  styleUrl: './choice-group.scss',
  styles: `
    legend {
      margin-bottom: 4px;
    }
  `,
})
export class RoleCheckboxes {
  readonly group = input.required<RoleGroup>();
  /** Whether to show the message (after a submit attempt, or when the server objected). */
  readonly showError = input(false);

  protected readonly roles = ROLES;
  protected readonly labels = ROLE_LABELS;
  protected readonly errorId = `ny-roles-error-${nextId++}`;
}
