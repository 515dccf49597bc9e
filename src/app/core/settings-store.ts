import { httpResource } from '@angular/common/http';
import { Injectable, computed, inject } from '@angular/core';
import type { CoopSettings } from '../../../shared/api-types';
import { AuthStore } from './auth-store';
import { SettingsApi } from './settings-api';

/** The co-op's settings (`GET /api/settings`), read by everyone signed in and written by the admin. */
@Injectable({ providedIn: 'root' })
export class SettingsStore {
  // services
  readonly #auth = inject(AuthStore);
  readonly #api = inject(SettingsApi);

  readonly resource = httpResource<CoopSettings>(() => (this.#auth.signedIn() ? '/api/settings' : undefined));
  readonly settings = computed(() => (this.resource.hasValue() ? this.resource.value() : null));
  readonly coopName = computed(() => this.settings()?.coopName ?? null);

  async save(settings: CoopSettings): Promise<CoopSettings> {
    const saved = await this.#api.save(settings);
    this.resource.set(saved);
    return saved;
  }
}
