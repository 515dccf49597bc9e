/**
 * The contracted view of an outlook (issue 19) as the API answers it: the engine's evaluation of the
 * binding contracts (server/estimation/contracted.ts) against the outlook's model and base prices,
 * with the farms and items named, and the contract-based input demand beside the outlook's own.
 */
import type { ContractRow } from './contract-schemas.js';
import type { ContractedEvaluation } from './contracted-types.js';

export interface ContractedItem {
  code: string;
  name: string;
  unit: string;
  role: 'output' | 'input';
  category: string;
}

/** A point and a 90 % band (5 % and 95 % points). */
export interface DemandBand {
  point: number;
  p5: number;
  p95: number;
}

/** One input's co-op demand on the two bases the treasurer can budget on. */
export interface DemandBasisRow {
  item: string;
  name: string;
  unit: string;
  /** The outlook's base scenario: every farm's output free (unconditional demand). */
  outlook: DemandBand;
  /** Contracting farms at their committed output (conditional demand) plus the other farms as the outlook projects them. */
  contracted: DemandBand;
}

export interface ContractedView {
  outlookId: number;
  season: string;
  modelRunId: number;
  computedAt: string;
  /** What the figures were computed from (the outlook's inputs and the binding contracts' versions). */
  inputsHash: string;
  currency: string;
  items: ContractedItem[];
  /** The contracts evaluated: signed and delivered ones of the season. */
  contracts: ContractRow[];
  /** Contracts of the season left out: offers not yet signed, and cancelled ones. */
  leftOut: { offered: number; cancelled: number };
  /** Farm code → id and name. */
  farms: Record<string, { farmId: number; name: string }>;
  evaluation: ContractedEvaluation;
  /** Null when the outlook has no up-to-date projection to compare with. */
  demandBasis: { rows: DemandBasisRow[]; note: string } | null;
}

export type ContractedStatus = 'none' | 'queued' | 'running' | 'succeeded' | 'failed';

export interface ContractedState {
  status: ContractedStatus;
  progress: number;
  stage: string;
  error: string | null;
  /** The outlook or the contracts changed since the view was computed: evaluate again. */
  stale: boolean;
  view: ContractedView | null;
}

/** A member's own contracts, with their farm's figures from the latest evaluation of the season when there is one. */
export interface MyContracts {
  farmName: string | null;
  contracts: ContractRow[];
  /** Per contract id: the estimated marginal cost at the farm's committed tonnage and the margin, with bands. */
  figures: Record<number, { marginalCost: DemandBand | null; margin: DemandBand | null } | undefined>;
  /** The farm's conditional fertiliser need (N, P2O5, K2O) for the committed output, per season evaluated. */
  nutrients: { season: string; items: { item: string; name: string; unit: string; band: DemandBand }[] }[];
  issues: string[];
  computedAt: string | null;
  caution: string;
}
