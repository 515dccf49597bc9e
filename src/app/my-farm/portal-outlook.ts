import { BreakpointObserver } from '@angular/cdk/layout';
import { MyContractsSection } from '../contracts/my-contracts';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, linkedSignal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { Router } from '@angular/router';
import { map } from 'rxjs';
import { errorMessage, errorStatus } from '../core/api-error';
import { FanChart, fanInputFor } from '../outlook/fan-chart';
import { OutlookCautions } from '../outlook/outlook-cautions';
import { formatDate, formatQuantity, formatShare, landSentence } from '../outlook/outlook-format';
import type { MemberVersion, MemberVersionRow } from '../outlook/outlook-api-types';
import { QuantityCards } from './quantity-cards';
import { PortalFertiliser } from './portal-fertiliser';
import { inItemOrder, PortalPrices } from './portal-prices';
import { PortalSource } from './portal-source';
import { LoadProblem } from '../shared/load-problem';

/**
 * `/my-farm/outlook`: the member's portal. The published outlook (co-op part) and the member's own
 * farm only; the server takes the farm from the session. A picker opens earlier versions.
 * Each section reads one part of the version; the self-contained ones are components of their own
 * (np-portal-fertiliser, np-portal-prices, np-portal-source): a new section (contracts, bookings)
 * is added the same way, as a component in a `<section class="block">` of the template.
 */
@Component({
  selector: 'np-portal-outlook',
  imports: [MyContractsSection, MatProgressBar, MatFormField, MatLabel, MatSelect, MatOption, FanChart, OutlookCautions, QuantityCards, PortalFertiliser, PortalPrices, PortalSource, LoadProblem],
  templateUrl: './portal-outlook.html',
  styleUrl: './portal-outlook.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PortalOutlook {
  readonly #router = inject(Router);

  // inputs
  /** Query parameter: a published version's id; the newest of the latest season when absent. */
  readonly version = input<string | undefined>(undefined);

  protected readonly versions = httpResource<MemberVersionRow[]>(() => '/api/portal/outlook/versions');
  /** null (a 204 from the server) while nothing is published. */
  protected readonly outlook = httpResource<MemberVersion | null>(() => {
    const v = this.version();
    return v ? `/api/portal/outlook/versions/${encodeURIComponent(v)}` : '/api/portal/outlook';
  });
  protected readonly o = computed(() => (this.outlook.hasValue() ? this.outlook.value() : null));
  protected readonly nothing = computed(() => (this.outlook.hasValue() && this.outlook.value() === null) || errorStatus(this.outlook.error()) === 404);
  protected readonly problem = computed(() => (this.outlook.error() && !this.nothing() ? errorMessage(this.outlook.error()) : null));
  protected readonly versionList = computed(() => (this.versions.hasValue() ? this.versions.value() : []));

  readonly #narrow = toSignal(
    inject(BreakpointObserver)
      .observe('(max-width: 599.98px)')
      .pipe(map((s) => s.matches)),
    { initialValue: false },
  );
  protected readonly narrow = this.#narrow;

  /** The item the fan charts show: the farm's first output to begin with. */
  protected readonly item = linkedSignal(() => {
    const items = this.o()?.farm?.items ?? this.o()?.projection.coop.items ?? [];
    return (items.find((i) => i.role === 'output') ?? items[0])?.item ?? '';
  });
  protected readonly farmFan = computed(() => {
    const o = this.o();
    const it = o?.farm?.items.find((i) => i.item === this.item());
    return o?.farm && it ? fanInputFor(it, o.farm.history, o.season.label, { compact: this.narrow(), maxHistory: this.narrow() ? 8 : 12 }) : null;
  });
  protected readonly coopFan = computed(() => {
    const o = this.o();
    const it = o?.projection.coop.items.find((i) => i.item === this.item());
    return o && it ? fanInputFor(it, o.projection.coop.history, o.season.label, { compact: this.narrow(), maxHistory: this.narrow() ? 8 : 12 }) : null;
  });
  /** The base scenario's deliveries in one sentence: the figure at the estimates, its band and its share of storage. */
  protected readonly delivered = computed(() => {
    const c = this.o()?.projection.coop;
    const d = c?.deliveries?.scenarios['base'];
    if (!c || !d) return null;
    const storage = c.capacity?.scenarios['base']?.storageShare?.point ?? null;
    const capacity = c.capacity?.storageCapacityT ?? null;
    const band = `likely range ${formatQuantity(d.p5)}–${formatQuantity(d.p95)} t`;
    return {
      point: formatQuantity(d.point),
      rest: storage !== null && capacity ? `${band}; ${formatShare(storage)} of the co-op's ${formatQuantity(capacity)} t of storage` : band,
    };
  });

  /** What the cards' figures are and what their range covers, in words (the server's, as in the e-mail). */
  protected readonly statisticNote = computed(() => {
    const o = this.o();
    return o ? `Each figure is the model's best estimate, the one in the outlook e-mail. ${o.plain.bandWords}` : '';
  });

  /** The farm's items in the portal's one order (the chart picker follows the cards). */
  protected readonly orderedFarmItems = computed(() => {
    const o = this.o();
    return o?.farm ? inItemOrder(o.farm.items, o.plain.itemOrder) : [];
  });

  protected fanNote(season: string, recorded: string): string {
    return `${recorded}, then ${season}: for each price scenario the middle outcome (dashed) inside its likely range, where 9 in 10 outcomes should fall. The cards show the model's best estimate, close to the dashed line.`;
  }

  protected readonly formatDate = formatDate;
  protected readonly formatQuantity = formatQuantity;
  protected readonly formatShare = formatShare;
  protected readonly landSentence = landSentence;

  protected chooseVersion(id: number): void {
    void this.#router.navigate(['/my-farm/outlook'], { queryParams: { version: id } });
  }
}
