import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, Validators } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { MatOption, MatSelect } from '@angular/material/select';
import type { FarmSummary, UserSummary } from '../../../../shared/api-types';
import { ROLES, ROLE_LABELS, type Role } from '../../../../shared/roles';
import { emailSchema } from '../../../../shared/schemas';
import { TEXT_MAX } from '../../../../shared/field-limits';
import { ApiRequestError, errorMessage } from '../../core/api-error';
import { applyServerDetails, zodValidator } from '../../shared/zod-validator';
import { UsersApi } from './users-api';
import { FORM_DIALOG_IMPORTS } from '../../shared/form-dialog';
import { runBusy } from '../../shared/run-busy';

export interface UserDialogData {
  /** The account to edit; absent when inviting someone new. */
  user?: UserSummary;
  farms: FarmSummary[];
}

const ROLE_HINTS: Record<Role, string> = {
  admin: 'Invites people, sets roles and the co-op settings',
  planner: 'Keeps data, fits models and publishes outlooks',
  treasurer: 'Plans purchases and cash; reads models and outlooks',
  member: 'Reads published outlooks and only their own farm',
};

/** Invites a person, or edits an account's name, role and farm. Closes with the saved account. */
@Component({
  selector: 'np-user-dialog',
  imports: [FORM_DIALOG_IMPORTS, MatSelect, MatOption],
  templateUrl: './user-dialog.html',
  styles: `
    form {
      display: flex;
      flex-direction: column;
      gap: 12px;
      padding-top: 8px;
      min-width: min(420px, 70vw);
    }
    .problem {
      margin: 0;
      color: var(--mat-sys-error);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UserDialog {
  // services
  readonly #api = inject(UsersApi);
  readonly #dialogRef = inject<MatDialogRef<UserDialog, UserSummary>>(MatDialogRef);
  protected readonly data = inject<UserDialogData>(MAT_DIALOG_DATA);

  protected readonly roles = ROLES;
  protected readonly roleLabels = ROLE_LABELS;
  protected readonly roleHints = ROLE_HINTS;
  protected readonly editing = this.data.user !== undefined;

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: [this.data.user?.email ?? '', [Validators.required, zodValidator(emailSchema)]],
    name: [this.data.user?.name ?? '', [Validators.required, Validators.maxLength(TEXT_MAX.name)]],
    role: [this.data.user?.role ?? ('member' as Role), Validators.required],
    farmId: [this.data.user?.farmId ?? (null as number | null)],
  });
  protected readonly role = toSignal(this.form.controls.role.valueChanges, { initialValue: this.form.controls.role.value });
  protected readonly needsFarm = computed(() => this.role() === 'member');
  /** Several members may share a farm (a family farm): each option names the others already linked. */
  protected readonly farmOptions = computed(() =>
    [...this.data.farms]
      .sort((a, b) => a.name.localeCompare(b.name))
      .map((farm) => {
        const others = farm.members.filter((m) => m.id !== this.data.user?.id).map((m) => m.name);
        return { farm, alsoLinked: others.length ? others.join(', ') : null };
      }),
  );
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);

  constructor() {
    if (this.editing) this.form.controls.email.disable();
  }

  protected async save(): Promise<void> {
    const farmControl = this.form.controls.farmId;
    farmControl.setErrors(this.needsFarm() && farmControl.value === null ? { required: true } : null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const { email, name, role, farmId } = this.form.getRawValue();
    const farm = role === 'member' ? farmId : null;
    this.failure.set(null);
    await runBusy(
      this.saving,
      async () => {
        const saved = this.data.user
          ? await this.#api.update(this.data.user.id, { name: name.trim(), role, farmId: farm })
          : await this.#api.invite({ email: email.trim(), name: name.trim(), role, farmId: farm });
        this.#dialogRef.close(saved);
      },
      (error) => {
        // 409 names either the e-mail address (an account exists) or the farm (it has a member already).
        if (error instanceof ApiRequestError && error.status === 409 && !this.editing && error.message.includes(email.trim())) {
          this.form.controls.email.setErrors({ server: error.message });
        } else if (!(error instanceof ApiRequestError && applyServerDetails(this.form.controls, error.error.details))) {
          this.failure.set(errorMessage(error));
        }
      },
    );
  }
}
