import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type {
  ExpectationSetting,
  FuturesQuote,
  FuturesQuoteInput,
  OutlookDraft,
  OutlookPatch,
  ProjectionState,
  PublishAnswer,
} from './outlook-api-types';

/** The planner's changes to season outlooks (reads go through `httpResource` in the pages). */
@Injectable({ providedIn: 'root' })
export class OutlookApi {
  readonly #http = inject(HttpClient);

  create(body: { season: string; title?: string; modelRunId?: number | null }): Promise<OutlookDraft> {
    return firstValueFrom(this.#http.post<OutlookDraft>('/api/outlooks', body));
  }

  update(id: number, patch: OutlookPatch): Promise<OutlookDraft> {
    return firstValueFrom(this.#http.patch<OutlookDraft>(`/api/outlooks/${id}`, patch));
  }

  /** Replaces the whole list of settings; the server recomputes every expected price. */
  setExpectations(id: number, items: ExpectationSetting[]): Promise<OutlookDraft> {
    return firstValueFrom(this.#http.put<OutlookDraft>(`/api/outlooks/${id}/expectations`, { items }));
  }

  startProjection(id: number): Promise<{ status: 'queued'; jobId: number }> {
    return firstValueFrom(this.#http.post<{ status: 'queued'; jobId: number }>(`/api/outlooks/${id}/projection`, null));
  }

  /** The draft's projection state without its tables (the draft carries it), for polling. */
  async projectionState(id: number): Promise<ProjectionState> {
    return (await firstValueFrom(this.#http.get<OutlookDraft>(`/api/outlooks/${id}`))).projection;
  }

  publish(id: number, body: { commentary?: string; notifyMembers: boolean; acceptWeakSkill?: boolean }): Promise<PublishAnswer> {
    return firstValueFrom(this.#http.post<PublishAnswer>(`/api/outlooks/${id}/publish`, body));
  }

  retryDelivery(id: number, deliveryId: number): Promise<unknown> {
    return firstValueFrom(this.#http.post(`/api/outlooks/${id}/deliveries/${deliveryId}/retry`, null));
  }

  addQuote(body: FuturesQuoteInput): Promise<FuturesQuote> {
    return firstValueFrom(this.#http.post<FuturesQuote>('/api/futures-quotes', body));
  }

  updateQuote(id: number, body: FuturesQuoteInput): Promise<FuturesQuote> {
    return firstValueFrom(this.#http.put<FuturesQuote>(`/api/futures-quotes/${id}`, body));
  }

  deleteQuote(id: number): Promise<unknown> {
    return firstValueFrom(this.#http.delete(`/api/futures-quotes/${id}`, { responseType: 'text' }));
  }

  setMailPreferences(outlookEmails: boolean): Promise<{ email: string; outlookEmails: boolean }> {
    return firstValueFrom(this.#http.put<{ email: string; outlookEmails: boolean }>('/api/account/mail-preferences', { outlookEmails }));
  }
}
