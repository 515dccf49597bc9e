import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatDialog } from '@angular/material/dialog';
import { MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { firstValueFrom } from 'rxjs';
import { ApiRequestError, errorMessage } from '../../core/api-error';
import { CautionNote } from '../../shared/caution-note';
import { ConfirmDialog, type ConfirmDialogData } from '../../shared/confirm-dialog';
import { bookingAmounts } from '../../../../shared/booking-money';
import type { BookingLine, BookingOffer, BookingProduct, BookingView } from '../../../../shared/booking-types';
import type { NutrientAmounts } from '../../../../shared/budget-types';
import { BookingApi } from './booking-api';
import { day, kg, money, month, nutrientLine, pct, perHa, tonnes } from './booking-format';

type Step = 'form' | 'review';

/**
 * `/my-farm/bookings`: the member books the season's fertiliser for their own farm at the round's
 * booking prices, reviews the amounts, and prepays on the payment service's hosted page. The server
 * prices every booking; the review shows the same rules (shared/booking-money.ts) before sending.
 */
@Component({
  selector: 'np-booking-page',
  imports: [ReactiveFormsModule, MatButton, MatCheckbox, MatFormField, MatLabel, MatHint, MatSuffix, MatInput, MatSelect, MatOption, MatProgressBar, CautionNote],
  templateUrl: './booking-page.html',
  styleUrl: './booking-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BookingPage {
  readonly #api = inject(BookingApi);
  readonly #dialog = inject(MatDialog);

  /** Query parameters set by the payment page's return links. */
  readonly paid = input<string | undefined>(undefined);
  readonly cancelled = input<string | undefined>(undefined);

  protected readonly offerResource = httpResource<BookingOffer | null>(() => '/api/bookings/offer');
  protected readonly offer = computed(() => (this.offerResource.hasValue() ? this.offerResource.value() : null));
  protected readonly loaded = computed(() => this.offerResource.hasValue() || !!this.offerResource.error());
  protected readonly loadProblem = computed(() => (this.offerResource.error() ? errorMessage(this.offerResource.error()) : null));
  protected readonly booking = computed(() => this.offer()?.booking ?? null);

  protected readonly editing = signal(false);
  protected readonly step = signal<Step>('form');
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  /** Server asked to confirm quantities far above the projected need. */
  protected readonly largeWarnings = signal<string[]>([]);
  protected readonly confirmLarge = new FormControl(false, { nonNullable: true });

  protected readonly form = new FormGroup({
    deliveryMonth: new FormControl('', { nonNullable: true }),
    quantities: new FormGroup<Record<string, FormControl<number | null>>>({}),
  });
  readonly #values = signal(this.form.getRawValue());

  protected readonly fmt = { money, kg, tonnes, pct, day, month, nutrientLine, perHa };

  constructor() {
    this.form.valueChanges.subscribe(() => this.#values.set(this.form.getRawValue()));
    // Build one quantity field per product when the offer arrives; fill from the booking if there is one.
    effect(() => {
      const o = this.offer();
      if (!o) return;
      this.#fill(o, o.booking);
    });
    // Back from the payment page: the webhook may take a moment; read again a few times.
    effect(() => {
      if (this.paid() && this.booking()?.status === 'placed') setTimeout(() => this.offerResource.reload(), 1500);
    });
  }

  #fill(o: BookingOffer, b: BookingView | null) {
    const q = this.form.controls.quantities;
    for (const p of o.products) {
      const line = b?.lines.find((l) => l.productId === p.productId);
      const value = line ? line.kg / 1000 : null;
      if (q.contains(String(p.productId))) q.controls[String(p.productId)]!.setValue(value, { emitEvent: false });
      else q.addControl(String(p.productId), new FormControl<number | null>(value), { emitEvent: false });
    }
    const first = o.deliveryMonths.includes(o.planDeliveryMonth) ? o.planDeliveryMonth : (o.deliveryMonths[0] ?? '');
    this.form.controls.deliveryMonth.setValue(b?.deliveryMonth ?? first, { emitEvent: false });
    this.#values.set(this.form.getRawValue());
  }

  protected readonly showForm = computed(() => {
    const b = this.booking();
    return !b || this.editing();
  });

  /** Lines as entered, with the nutrients they bring (display only). */
  protected readonly lines = computed(() => {
    const o = this.offer();
    const v = this.#values();
    if (!o) return [];
    return o.products
      .map((p) => ({ p, t: Number(v.quantities[String(p.productId)] ?? 0) }))
      .filter((x) => Number.isFinite(x.t) && x.t > 0)
      .map(({ p, t }) => ({ product: p, tonnes: t, kg: Math.round(t * 1000), nutrients: this.nutrients(p, t) }));
  });

  protected nutrients(p: BookingProduct, t: number | null | undefined): NutrientAmounts {
    const k = (Number(t) || 0) * 1000;
    return { nitrogen: (k * p.nPct) / 100, phosphate: (k * p.p2o5Pct) / 100, potash: (k * p.k2oPct) / 100 };
  }

  protected readonly totalNutrients = computed(() =>
    this.lines().reduce<NutrientAmounts>((a, l) => ({ nitrogen: a.nitrogen + l.nutrients.nitrogen, phosphate: a.phosphate + l.nutrients.phosphate, potash: a.potash + l.nutrients.potash }), { nitrogen: 0, phosphate: 0, potash: 0 }),
  );

  /** The amounts the server will charge, by the same rules (shared/booking-money.ts). */
  protected readonly amounts = computed(() => {
    const o = this.offer();
    if (!o) return null;
    const discount = o.round.beforeDeadline ? o.round.discountBp : 0;
    return bookingAmounts(
      this.lines().map((l) => ({ kg: l.kg, pricePerTMinor: l.product.pricePerTMinor })),
      discount,
      o.round.vatBp,
    );
  });

  protected suggested(productId: number): number | null {
    return this.offer()?.suggestion.find((s) => s.productId === productId)?.tonnes ?? null;
  }

  protected useSuggestion() {
    const o = this.offer();
    if (!o) return;
    for (const p of o.products) this.form.controls.quantities.controls[String(p.productId)]?.setValue(this.suggested(p.productId));
  }

  protected review() {
    this.problem.set(null);
    if (!this.lines().length) {
      this.problem.set('Enter tonnes for at least one product.');
      return;
    }
    if (!this.form.controls.deliveryMonth.value) {
      this.problem.set('Choose a delivery month.');
      return;
    }
    this.step.set('review');
  }

  protected back() {
    this.step.set('form');
    this.largeWarnings.set([]);
    this.confirmLarge.setValue(false);
  }

  protected startChange() {
    const o = this.offer();
    if (o) this.#fill(o, o.booking);
    this.editing.set(true);
    this.step.set('form');
  }

  protected stopChange() {
    const o = this.offer();
    if (o) this.#fill(o, o.booking);
    this.editing.set(false);
    this.step.set('form');
    this.problem.set(null);
  }

  protected async confirm() {
    const b = this.booking();
    const input = {
      lines: this.lines().map((l) => ({ productId: l.product.productId, tonnes: l.tonnes })),
      deliveryMonth: this.form.controls.deliveryMonth.value,
      ...(this.largeWarnings().length && this.confirmLarge.value ? { confirmLarge: true } : {}),
      ...(b ? { version: b.version } : {}),
    };
    this.busy.set(true);
    this.problem.set(null);
    try {
      if (b && this.editing()) await this.#api.change(b.id, input);
      else await this.#api.place(input);
      this.editing.set(false);
      this.step.set('form');
      this.largeWarnings.set([]);
      this.confirmLarge.setValue(false);
      this.offerResource.reload();
    } catch (err) {
      if (err instanceof ApiRequestError && err.code === 'needs_confirmation') this.largeWarnings.set((err.error.details ?? []).map((d) => d.message));
      else this.problem.set(errorMessage(err));
    } finally {
      this.busy.set(false);
    }
  }

  protected async pay() {
    const b = this.booking();
    if (!b) return;
    this.busy.set(true);
    this.problem.set(null);
    try {
      const start = await this.#api.checkout(b.id);
      window.location.assign(start.url);
    } catch (err) {
      this.problem.set(errorMessage(err));
      this.busy.set(false);
    }
  }

  protected async cancelBooking() {
    const b = this.booking();
    if (!b) return;
    const data: ConfirmDialogData = {
      title: 'Cancel this booking?',
      message: b.status === 'prepaid' ? `Your prepayment of ${money(b.payments.find((p) => p.state === 'paid')?.amountMinor ?? b.totalMinor, b.currency)} is refunded in full to the card or account you paid with.` : 'Nothing has been charged for it.',
      confirmLabel: 'Cancel booking',
      cancelLabel: 'Keep it',
      destructive: true,
    };
    const ok = await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed());
    if (!ok) return;
    this.busy.set(true);
    this.problem.set(null);
    try {
      await this.#api.cancel(b.id);
      this.editing.set(false);
      this.offerResource.reload();
    } catch (err) {
      this.problem.set(errorMessage(err));
    } finally {
      this.busy.set(false);
    }
  }

  protected statusWords(b: BookingView): string {
    if (b.status === 'prepaid') return 'Prepaid';
    if (b.status === 'cancelled') return 'Cancelled';
    return 'Booked, not paid yet';
  }

  protected paidAmount(b: BookingView): number | null {
    return b.payments.find((p) => p.state === 'paid')?.amountMinor ?? null;
  }

  protected lineNutrients(l: BookingLine): string {
    return nutrientLine(l.nutrients);
  }
}
