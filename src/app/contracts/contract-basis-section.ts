import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, effect, linkedSignal, untracked } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatOption, MatSelect } from '@angular/material/select';
import type { DemandBand } from '../../../shared/contracted-view';
import { nutrientAmount } from '../../../shared/contract-words';
import { CautionNote } from '../shared/caution-note';
import { ContractEvaluation } from './contract-evaluation';
import { ContractEvaluationStatus } from './contract-evaluation-status';

const signedPct = (v: number) => `${v > 0 ? '+' : v < 0 ? '−' : ''}${Math.abs(v).toLocaleString('en-GB', { maximumFractionDigits: 1 })} %`;

/**
 * The budget's two bases side by side (issue 19): the co-op's fertiliser (and fuel, labour) demand as
 * the season outlook projects it (every farm's output free: unconditional) and with the contracting
 * farms held to their signed tonnage (conditional demand). The figures are the outlook's contracted
 * view, computed on the server.
 */
@Component({
  selector: 'np-contract-basis-section',
  imports: [MatButton, MatIcon, MatFormField, MatLabel, MatSelect, MatOption, ContractEvaluationStatus, CautionNote],
  templateUrl: './contract-basis-section.html',
  styleUrl: './contracted-section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ContractBasisSection {
  protected readonly evaluation = new ContractEvaluation();
  protected readonly outlooks = httpResource<{ id: number; season: string; title: string }[]>(() => '/api/outlooks');
  protected readonly outlookId = linkedSignal<number | null>(() => (this.outlooks.hasValue() ? (this.outlooks.value()[0]?.id ?? null) : null));
  protected readonly state = this.evaluation.state;
  protected readonly active = this.evaluation.active;

  protected readonly rows = computed(() => {
    const basis = this.state()?.view?.demandBasis;
    if (!basis) return [];
    const fmt = (q: DemandBand, unit: string) => nutrientAmount(q.point, unit);
    const band = (q: DemandBand, unit: string) => `${nutrientAmount(q.p5, unit)} to ${nutrientAmount(q.p95, unit)}`;
    return basis.rows.map((r) => ({
      name: r.name,
      outlook: fmt(r.outlook, r.unit),
      outlookBand: band(r.outlook, r.unit),
      contracted: fmt(r.contracted, r.unit),
      contractedBand: band(r.contracted, r.unit),
      change: r.outlook.point > 0 ? signedPct((100 * (r.contracted.point - r.outlook.point)) / r.outlook.point) : '—',
    }));
  });
  protected readonly note = computed(() => this.state()?.view?.demandBasis?.note ?? null);

  constructor() {
    effect(() => {
      const id = this.outlookId();
      untracked(() => void this.evaluation.load(id));
    });
  }

  protected async evaluate(): Promise<void> {
    const id = this.outlookId();
    if (id !== null) await this.evaluation.evaluate(id);
  }
}
