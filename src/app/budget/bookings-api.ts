import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { BookingRoundView } from '../../../shared/booking-types';

/** What the treasurer saves for a season's booking round (`PUT /api/bookings/rounds`). */
export interface BookingRoundSave {
  season: string;
  budgetId: number | null;
  discountDeadline: string;
  vatPct: number;
}

/** The treasurer's writes on `/budget/bookings` (the page reads through `httpResource`). */
@Injectable({ providedIn: 'root' })
export class BookingsApi {
  readonly #http = inject(HttpClient);

  saveRound(input: BookingRoundSave): Promise<BookingRoundView> {
    return firstValueFrom(this.#http.put<BookingRoundView>('/api/bookings/rounds', input));
  }
}
