import { DecimalPipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed } from '@angular/core';
import { MatAnchor, MatButton } from '@angular/material/button';
import { RouterLink } from '@angular/router';
import { MatCard, MatCardContent } from '@angular/material/card';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import type { MyFarm } from '../../../shared/api-types';
import { errorMessage, errorStatus } from '../core/api-error';
import { FERTILISER_RATE_CAUTION } from '../shared/base-cautions';
import { CautionNote } from '../shared/caution-note';
import { dayText } from '../../../shared/number-format';
import { LoadProblem } from '../shared/load-problem';

/** A published outlook version as the portal lists it. */
interface PortalVersion {
  id: number;
  version: number;
  season: string;
  title: string;
  publishedAt: string;
}

/** An outlook counts as new on Home for this many days after it is published. */
const NEW_FOR_DAYS = 30;

/** One line of the records table: an item and its quantity in each season. */
export interface RecordLine {
  item: string;
  role: 'output' | 'input';
  unit: string;
  bySeason: Record<string, number>;
}

/** Turns the flat record list into item lines with a quantity per season, outputs first, items in the order the server sent; seasons newest first. */
export function recordsBySeason(records: MyFarm['records']): { seasons: string[]; lines: RecordLine[] } {
  const seasons = [...new Set(records.map((r) => r.season))].sort((a, b) => b.localeCompare(a, undefined, { numeric: true }));
  const lines = new Map<string, RecordLine>();
  for (const r of records) {
    const key = `${r.role}\u0000${r.item}\u0000${r.unit}`;
    let line = lines.get(key);
    if (!line) {
      line = { item: r.item, role: r.role, unit: r.unit, bySeason: {} };
      lines.set(key, line);
    }
    line.bySeason[r.season] = (line.bySeason[r.season] ?? 0) + r.quantity;
  }
  // Outputs first; within each, the server's item order (the co-op's item list), as on the outlook pages.
  const ordered = [...lines.values()].sort((a, b) => (a.role === b.role ? 0 : a.role === 'output' ? -1 : 1));
  return { seasons, lines: ordered };
}

@Component({
  selector: 'np-my-farm-overview',
  imports: [
    DecimalPipe,
    MatCard,
    MatCardContent,
    MatIcon,
    MatButton,
    MatAnchor,
    RouterLink,
    MatProgressBar,
    MatTableModule,
    CautionNote,
    LoadProblem,
  ],
  templateUrl: './my-farm-overview.html',
  styleUrl: './my-farm-overview.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MyFarmOverview {
  protected readonly myFarm = httpResource<MyFarm>(() => '/api/my-farm');
  protected readonly fertiliserCaution = FERTILISER_RATE_CAUTION;
  protected readonly data = computed(() => (this.myFarm.hasValue() ? this.myFarm.value() : null));
  protected readonly noFarm = computed(() => errorStatus(this.myFarm.error()) === 404);
  protected readonly problem = computed(() =>
    this.myFarm.error() && !this.noFarm() ? errorMessage(this.myFarm.error()) : null,
  );
  protected readonly table = computed(() => recordsBySeason(this.data()?.records ?? []));

  /** Published outlooks, newest season first: the member's next step is to read the newest. */
  protected readonly versions = httpResource<PortalVersion[]>(() => '/api/portal/outlook/versions');
  protected readonly newest = computed(() => {
    const list = this.versions.hasValue() ? this.versions.value() : [];
    const v = list[0];
    if (!v) return null;
    const ageDays = (Date.now() - new Date(v.publishedAt).getTime()) / 86_400_000;
    return { ...v, isNew: ageDays <= NEW_FOR_DAYS, publishedOn: dayText(v.publishedAt, Intl.DateTimeFormat().resolvedOptions().timeZone) };
  });
  protected readonly columns = computed(() => ['item', ...this.table().seasons]);

  /** Tonnes and hectares to one decimal; litres, hours and kilograms are whole numbers at farm scale. */
  protected digitsFor(unit: string): string {
    return unit === 't' || unit === 'ha' ? '1.1-1' : '1.0-0';
  }
}
