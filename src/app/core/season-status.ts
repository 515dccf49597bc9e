import { httpResource } from '@angular/common/http';
import { Injectable, computed, inject } from '@angular/core';
import type { MemberVersionRow, OutlookListRow } from '../outlook/outlook-api-types';
import { roleAllows, ACCESS } from './access';
import { AuthStore } from './auth-store';

/** What the frame's header says about the season being planned. */
export interface SeasonState {
  /** e.g. "2026/27" */
  season: string;
  /** The outlook's state in a few words: "outlook published, version 2, 3 Dec" or "outlook in draft". */
  state: string;
  /** For the marker's colour. */
  tone: 'draft' | 'published' | 'none';
}

const DAY = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short' });

/**
 * The season being planned and its outlook's state, for the frame's header: the newest season with
 * an outlook (staff read the outlook list, members their published versions). `refresh()` asks
 * again, e.g. after a navigation, so publishing shows up without a reload.
 */
@Injectable({ providedIn: 'root' })
export class SeasonStatus {
  readonly #auth = inject(AuthStore);

  readonly #staff = computed(() => roleAllows(this.#auth.role(), ACCESS.outlook));
  readonly #member = computed(() => roleAllows(this.#auth.role(), ACCESS.myFarm));
  readonly #outlooks = httpResource<OutlookListRow[]>(() => (this.#staff() ? '/api/outlooks' : undefined));
  readonly #versions = httpResource<MemberVersionRow[]>(() => (this.#member() ? '/api/portal/outlook/versions' : undefined));

  readonly current = computed<SeasonState | null>(() => {
    if (this.#staff() && this.#outlooks.hasValue()) {
      const o = this.#outlooks.value()[0];
      if (!o) return null;
      if (o.latestVersion) {
        const v = o.latestVersion;
        return { season: o.season, state: `outlook published · version ${v.version} · ${DAY.format(new Date(v.publishedAt))}`, tone: 'published' };
      }
      return { season: o.season, state: 'outlook in draft', tone: 'draft' };
    }
    if (this.#member() && this.#versions.hasValue()) {
      const v = this.#versions.value()[0];
      if (!v) return null;
      return { season: v.season, state: `outlook published ${DAY.format(new Date(v.publishedAt))}`, tone: 'published' };
    }
    return null;
  });

  refresh(): void {
    if (this.#staff()) this.#outlooks.reload();
    if (this.#member()) this.#versions.reload();
  }
}
