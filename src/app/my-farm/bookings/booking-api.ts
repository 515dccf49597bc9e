import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { BookingInput, BookingView, CheckoutStart } from '../../../../shared/booking-types';

/** The member's writes to their own farm's booking (the page reads through `httpResource`). */
@Injectable({ providedIn: 'root' })
export class BookingApi {
  readonly #http = inject(HttpClient);

  place(input: BookingInput): Promise<BookingView> {
    return firstValueFrom(this.#http.post<BookingView>('/api/bookings', input));
  }

  change(id: number, input: BookingInput): Promise<BookingView> {
    return firstValueFrom(this.#http.put<BookingView>(`/api/bookings/${id}`, input));
  }

  checkout(id: number): Promise<CheckoutStart> {
    return firstValueFrom(this.#http.post<CheckoutStart>(`/api/bookings/${id}/checkout`, {}));
  }

  cancel(id: number): Promise<BookingView> {
    return firstValueFrom(this.#http.post<BookingView>(`/api/bookings/${id}/cancel`, {}));
  }
}
