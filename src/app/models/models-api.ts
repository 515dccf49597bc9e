import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { ModelDefinition } from '../../../shared/model-schemas';
import type { Evaluation, ModelSummary, RunStatus } from './models-api-types';

/** Writes and on-demand reads of the model workspace (page reads go through `httpResource`). */
@Injectable({ providedIn: 'root' })
export class ModelsApi {
  readonly #http = inject(HttpClient);

  create(name: string, definition: ModelDefinition): Promise<ModelSummary> {
    return firstValueFrom(this.#http.post<ModelSummary>('/api/models', { name, definition }));
  }

  remove(modelId: number): Promise<unknown> {
    return firstValueFrom(this.#http.delete(`/api/models/${modelId}`, { responseType: 'text' }));
  }

  /** Snapshots the data and queues the fit; answers at once (202) with the queued run. */
  startRun(modelId: number): Promise<RunStatus> {
    return firstValueFrom(this.#http.post<RunStatus>(`/api/models/${modelId}/runs`, null));
  }

  rerun(runId: number): Promise<RunStatus> {
    return firstValueFrom(this.#http.post<RunStatus>(`/api/model-runs/${runId}/rerun`, null));
  }

  cancel(runId: number): Promise<RunStatus> {
    return firstValueFrom(this.#http.post<RunStatus>(`/api/model-runs/${runId}/cancel`, null));
  }

  status(runId: number): Promise<RunStatus> {
    return firstValueFrom(this.#http.get<RunStatus>(`/api/model-runs/${runId}/status`));
  }

  /** Netputs, profit and elasticities of a finished run at the given prices (others at the sample means). */
  evaluate(runId: number, prices: Record<string, number>, fixed: Record<string, number> = {}): Promise<Evaluation> {
    let params = new HttpParams();
    const pairs = (o: Record<string, number>) =>
      Object.entries(o)
        .map(([k, v]) => `${k}=${v}`)
        .join(',');
    if (Object.keys(prices).length) params = params.set('prices', pairs(prices));
    if (Object.keys(fixed).length) params = params.set('fixed', pairs(fixed));
    return firstValueFrom(this.#http.get<Evaluation>(`/api/model-runs/${runId}/evaluate`, { params }));
  }
}
