import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { ContractInput, ContractRow } from '../../../shared/contract-schemas';
import type { ContractedState } from '../../../shared/contracted-view';

/** `/api/contracts`: delivery contracts, and the contracted view of an outlook (the one place the contracts screens use HttpClient). */
@Injectable({ providedIn: 'root' })
export class ContractsApi {
  readonly #http = inject(HttpClient);

  create(body: ContractInput): Promise<ContractRow> {
    return firstValueFrom(this.#http.post<ContractRow>('/api/contracts', body));
  }
  update(id: number, body: ContractInput, version: number): Promise<ContractRow> {
    return firstValueFrom(this.#http.put<ContractRow>(`/api/contracts/${id}`, { ...body, version }));
  }
  remove(id: number): Promise<void> {
    return firstValueFrom(this.#http.delete<void>(`/api/contracts/${id}`));
  }
  /** The outlook's contracted view: the latest evaluation's state (polled while one runs). */
  state(outlookId: number): Promise<ContractedState> {
    return firstValueFrom(this.#http.get<ContractedState>(`/api/contracts/outlooks/${outlookId}/evaluation`));
  }
  evaluate(outlookId: number): Promise<ContractedState> {
    return firstValueFrom(this.#http.post<ContractedState>(`/api/contracts/outlooks/${outlookId}/evaluation`, {}));
  }
}
