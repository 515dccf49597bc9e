import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { CoopSettings } from '../../../shared/api-types';

/** The admin's change to the co-op's settings (the read is SettingsStore's `httpResource`). */
@Injectable({ providedIn: 'root' })
export class SettingsApi {
  readonly #http = inject(HttpClient);

  save(settings: CoopSettings): Promise<CoopSettings> {
    return firstValueFrom(this.#http.put<CoopSettings>('/api/settings', settings));
  }
}
