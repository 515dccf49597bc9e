import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, linkedSignal, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { errorMessage } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { ACCESS } from '../core/access';
import { CautionNote } from '../shared/caution-note';
import { FieldError } from '../shared/field-error';
import { zodValidator } from '../shared/zod-validator';
import { bookingRoundSchema, type BookingReport, type BookingRoundView, type NutrientComparison } from '../../../shared/booking-types';
import { MAX_VAT_PCT } from '../../../shared/field-limits';
import { day, kg, money, month, pct } from '../my-farm/bookings/booking-format';
import { BookingsApi } from './bookings-api';

const round = bookingRoundSchema.shape;

interface BudgetRow {
  id: number;
  name: string;
}

/**
 * `/budget/bookings`: members' real bookings against the budget. The treasurer opens a season's
 * booking round (budget, deadline, VAT) and reads booked, prepaid and outstanding per product and
 * delivery month, and cash received against the cash plan; the planner reads booked nutrients
 * against each farm's projection. Figures come from the server; this page only formats them.
 */
@Component({
  selector: 'np-member-bookings',
  imports: [ReactiveFormsModule, MatButton, MatAnchor, MatFormField, MatLabel, MatHint, MatError, FieldError, MatInput, MatSelect, MatOption, MatProgressBar, CautionNote],
  templateUrl: './member-bookings.html',
  styleUrl: './member-bookings.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MemberBookings {
  readonly #api = inject(BookingsApi);
  readonly #auth = inject(AuthStore);

  protected readonly canEdit = computed(() => this.#auth.hasRole(ACCESS.bookingRounds));
  protected readonly canReport = computed(() => this.#auth.hasRole(ACCESS.bookingRounds));
  protected readonly access = ACCESS;

  protected readonly rounds = httpResource<BookingRoundView[]>(() => '/api/bookings/rounds');
  protected readonly roundList = computed(() => (this.rounds.hasValue() ? this.rounds.value() : []));
  protected readonly roundId = linkedSignal<number | null>(() => this.roundList()[0]?.id ?? null);
  protected readonly round = computed(() => this.roundList().find((r) => r.id === this.roundId()) ?? null);

  protected readonly report = httpResource<BookingReport>(() => (this.canReport() && this.roundId() ? `/api/bookings/rounds/${this.roundId()}/report` : undefined));
  protected readonly nutrients = httpResource<NutrientComparison>(() => (this.roundId() ? `/api/bookings/rounds/${this.roundId()}/nutrients` : undefined));
  protected readonly budgets = httpResource<BudgetRow[]>(() => (this.canEdit() ? '/api/budgets' : undefined));

  protected readonly r = computed(() => (this.report.hasValue() ? this.report.value() : null));
  protected readonly n = computed(() => (this.nutrients.hasValue() ? this.nutrients.value() : null));
  protected readonly problem = computed(() => {
    const e = this.rounds.error() ?? this.report.error() ?? this.nutrients.error();
    return e ? errorMessage(e) : null;
  });

  protected readonly saving = signal(false);
  protected readonly saveProblem = signal<string | null>(null);
  protected readonly showForm = signal(false);
  protected readonly form = new FormGroup({
    // The shared schema's checks, so a field says what the server would: "The second year must follow the first".
    season: new FormControl('', { nonNullable: true, validators: [Validators.required, zodValidator(round.season)] }),
    budgetId: new FormControl<number | null>(null, { validators: [Validators.required] }),
    discountDeadline: new FormControl('', { nonNullable: true, validators: [Validators.required, zodValidator(round.discountDeadline)] }),
    vatPct: new FormControl<number | null>(null, { validators: [Validators.required, zodValidator(round.vatPct)] }),
  });
  protected readonly maxVatPct = MAX_VAT_PCT;
  /** The VAT field's words; its min and max attributes check before the schema, so they say the schema's messages. */
  protected readonly vatWords = {
    required: `Enter the VAT rate on fertiliser, 0 to ${MAX_VAT_PCT} %`,
    min: 'VAT cannot be negative',
    max: `A VAT rate above ${MAX_VAT_PCT} % is not plausible`,
  };

  protected readonly fmt = { money, kg, pct, day, month };

  /** The form for the round shown, or blank for another season's round. */
  protected openForm(blank = false) {
    const r = blank ? null : this.round();
    this.form.reset({ season: r?.season ?? '', budgetId: r?.budgetId ?? null, discountDeadline: r?.discountDeadline ?? '', vatPct: r ? r.vatBp / 100 : null });
    this.showForm.set(true);
  }

  protected async saveRound() {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    this.saving.set(true);
    this.saveProblem.set(null);
    try {
      const saved = await this.#api.saveRound({ season: v.season, budgetId: v.budgetId, discountDeadline: v.discountDeadline, vatPct: Number(v.vatPct) });
      this.showForm.set(false);
      this.rounds.reload();
      this.roundId.set(saved.id);
      this.report.reload();
    } catch (err) {
      this.saveProblem.set(errorMessage(err));
    } finally {
      this.saving.set(false);
    }
  }

  protected exportUrl(format: 'csv' | 'xlsx'): string {
    return `/api/bookings/rounds/${this.roundId()}/report/export?format=${format}`;
  }

  protected ratio(v: number | null): string {
    return v === null ? '–' : `${Math.round(v * 100)} %`;
  }
}
