import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, effect, input, signal, untracked } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import type { ContractedView } from '../../../shared/contracted-view';
import { CautionNote } from '../shared/caution-note';
import { ContractEvaluation } from './contract-evaluation';
import { ContractEvaluationStatus } from './contract-evaluation-status';
import { bandText, money, signedMoney, tonnes } from './contract-format';
import { runBusy } from '../shared/run-busy';

/**
 * The outlook's contracted view (issue 19): for the season's signed contracts, the estimated
 * marginal cost at the committed tonnage against the contract price (margin per unit, with its band)
 * and the conditional fertiliser, fuel and labour demand, per farm and for the co-op. Computed in a
 * worker thread on request; progress is shown while it runs.
 */
@Component({
  selector: 'np-contracted-section',
  imports: [DecimalPipe, RouterLink, MatButton, MatIcon, ContractEvaluationStatus, CautionNote],
  templateUrl: './contracted-section.html',
  styleUrl: './contracted-section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ContractedSection {
  readonly outlookId = input.required<number>();
  /** Whether this person may start an evaluation. */
  readonly canRun = input(false);

  protected readonly evaluation = new ContractEvaluation();
  protected readonly state = this.evaluation.state;
  protected readonly active = this.evaluation.active;
  protected readonly starting = signal(false);

  protected readonly view = computed<ContractedView | null>(() => this.state()?.view ?? null);
  protected readonly bandText = bandText;
  protected readonly money = money;
  protected readonly signedMoney = signedMoney;
  protected readonly tonnes = tonnes;

  /** Per committed output, the co-op line. */
  protected readonly coopOutputs = computed(() => {
    const v = this.view();
    if (!v) return [];
    const e = v.evaluation;
    return e.committedOutputs.map((code) => {
      const it = v.items.find((i) => i.code === code);
      const price = contractPrice(v, code);
      return { code, name: it?.name ?? code, unit: it?.unit ?? '', quantity: e.coop.quantities[code] ?? 0, mc: e.coop.marginalCost[code] ?? null, margin: e.coop.margin[code] ?? null, price };
    });
  });
  /** Conditional against unconditional input demand of the contracting farms, per input. */
  protected readonly coopInputs = computed(() => {
    const v = this.view();
    if (!v) return [];
    return v.items
      .filter((i) => i.role === 'input')
      .map((i) => ({ ...i, conditional: v.evaluation.coop.inputs[i.code] ?? null, unconditional: v.evaluation.coop.unconditionalInputs[i.code] ?? null }));
  });
  protected readonly farmRows = computed(() => {
    const v = this.view();
    if (!v) return [];
    const inputs = v.items.filter((i) => i.role === 'input' && (i.category === 'fertiliser' || i.category === 'fuel' || i.category === 'labour'));
    return v.evaluation.farms.flatMap((f) =>
      Object.entries(f.outputs).map(([code, o], k) => ({
        key: `${f.farm}-${code}`,
        farm: f.farm,
        farmName: v.farms[f.farm]?.name ?? f.farm,
        first: k === 0,
        item: v.items.find((i) => i.code === code)?.name ?? code,
        unit: v.items.find((i) => i.code === code)?.unit ?? '',
        o,
        evaluated: f.evaluated,
        inputs: inputs.map((i) => ({ name: i.name, unit: i.unit, q: f.inputs[i.code] ?? null })),
      })),
    );
  });
  protected readonly issues = computed(() => this.view()?.evaluation.farms.flatMap((f) => f.issues.map((i) => ({ farm: f.farm, ...i }))) ?? []);

  constructor() {
    effect(() => {
      const id = this.outlookId();
      untracked(() => void this.evaluation.load(id));
    });
  }

  protected async evaluate(): Promise<void> {
    this.evaluation.clearProblem();
    await runBusy(this.starting, () => this.evaluation.evaluate(this.outlookId()));
  }
}

/** The quantity-weighted contract price of an output over the contracts evaluated. */
function contractPrice(v: ContractedView, code: string): number | null {
  const cs = v.contracts.filter((c) => c.itemCode === code);
  const q = cs.reduce((a, c) => a + c.quantity, 0);
  return q > 0 ? cs.reduce((a, c) => a + c.quantity * c.price, 0) / q : null;
}
