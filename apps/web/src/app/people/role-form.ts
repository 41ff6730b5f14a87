import { FormControl, FormGroup, type AbstractControl, type ValidationErrors } from '@angular/forms';
import { ROLES, type Role } from '@nightyard/contracts';

export type RoleGroup = FormGroup<Record<Role, FormControl<boolean>>>;

function atLeastOneRole(group: AbstractControl): ValidationErrors | null {
  const value = group.value as Partial<Record<Role, boolean>>;
  return Object.values(value).some(Boolean) ? null : { noRole: true };
}

/** One checkbox per role, at least one ticked. */
export function roleGroup(initial: readonly Role[] = []): RoleGroup {
  const controls = Object.fromEntries(
    ROLES.map((r) => [r, new FormControl(initial.includes(r), { nonNullable: true })]),
  ) as Record<Role, FormControl<boolean>>;
  return new FormGroup(controls, { validators: atLeastOneRole });
}

export function chosenRoles(group: RoleGroup): Role[] {
  const value = group.getRawValue();
  return ROLES.filter((r) => value[r]);
}
