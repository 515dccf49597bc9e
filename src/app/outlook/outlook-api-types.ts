/**
 * The shapes the season-outlook API answers with. The data the server also builds on (expectations,
 * projection tables, published snapshots) is declared once in shared/outlook-types.ts; the rest are
 * answers the server assembles in its routes (server/outlook/API.md), listed with the fields the
 * screens read.
 */
import type { Comparison, ErrorHistory, FertiliserComparison, ExpectationMethod, ExpectationSetting, ItemExpectation, ProjectionTables, ScenarioRule } from '../../../shared/outlook-types';

export * from '../../../shared/outlook-types';

/** `GET /api/outlooks/:id/expectation-methods?item=`: every candidate method side by side. */
export interface MethodComparison {
  item: string;
  name: string;
  unit: string;
  priceUnit: string;
  season: string;
  errorWindow: number;
  history: { season: string; year: number; price: number }[];
  methods: {
    method: ExpectationMethod;
    label: string;
    value: number | null;
    explanation: string | null;
    errors: ErrorHistory | null;
    problem: string | null;
  }[];
}

export type ProjectionStatus = 'none' | 'queued' | 'running' | 'succeeded' | 'failed';

export interface ProjectionState {
  status: ProjectionStatus;
  /** 0..1 */
  progress: number;
  stage: string | null;
  error: string | null;
  projectedAt: string | null;
  /** The stored projection was made from the draft's current inputs (publishing needs this). */
  upToDate: boolean;
}

export interface VersionSummary {
  id: number;
  outlookId: number;
  version: number;
  season: string;
  title: string;
  modelRunId: number | null;
  publishedAt: string;
  publishedBy: string | null;
}

/** A finished run's back-test in words (server/outlook/run-choice.ts `skillView`). */
export interface RunSkillView {
  runId: number;
  modelId: number;
  modelName: string;
  spec: 'per-hectare' | 'pooled';
  specLabel: string;
  hasBacktest: boolean;
  text: string;
  items: { item: string; name: string; sentence: string; beatsRule: boolean }[];
  weakItems: { item: string; name: string; sentence: string }[];
  itemsBeatingRule: number;
  itemCount: number;
}

/** `GET /api/outlooks/run-choice`: every finished run's back-test and the one it favours. */
export interface RunChoiceAnswer {
  favoured: { runId: number; reason: string } | null;
  runs: RunSkillView[];
}

/** `GET /api/outlooks` rows. */
export interface OutlookListRow {
  id: number;
  season: string;
  startYear: number;
  title: string;
  modelRunId: number | null;
  projectionStatus: ProjectionStatus;
  updatedAt: string;
  versions: number;
  latestVersion: { id: number; version: number; publishedAt: string } | null;
}

/** `GET /api/outlooks/:id`. */
export interface OutlookDraft {
  id: number;
  season: string;
  seasonStartYear: number;
  title: string;
  modelRunId: number | null;
  expectationSettings: ExpectationSetting[];
  expectations: ItemExpectation[];
  scenarioRule: ScenarioRule;
  scenarioRuleText: string;
  draws: number;
  seed: number;
  commentary: string;
  projection: ProjectionState;
  versions: VersionSummary[];
  /** The back-test of the draft's run in words (null: no run chosen). */
  skill: RunSkillView | null;
  /** The latest version, and whether the draft is still exactly what it published. */
  published: { version: number | null; publishedAt: string | null; unchangedSince: boolean };
  cautions: string[];
  createdAt: string;
  updatedAt: string;
}

export interface OutlookPatch {
  title?: string;
  modelRunId?: number | null;
  commentary?: string;
  scenarioRule?: ScenarioRule;
  draws?: number;
  seed?: number;
}

/** `GET /api/outlooks/:id/projection`. */
export interface ProjectionAnswer extends ProjectionState {
  result: ProjectionTables | null;
}

export interface MemberVersionRow {
  id: number;
  outlookId: number;
  version: number;
  season: string;
  title: string;
  publishedAt: string;
}

export interface PublishAnswer {
  id: number;
  outlookId: number;
  version: number;
  season: string;
  publishedAt: string;
  mails: { queued: number; skipped: number };
}

export type DeliveryStatus = 'queued' | 'sending' | 'sent' | 'failed' | 'skipped';

export interface DeliveryRow {
  id: number;
  userId: number | null;
  name: string | null;
  to: string;
  status: DeliveryStatus;
  attempts: number;
  lastError: string | null;
  messageId: string | null;
  createdAt: string;
  nextAttemptAt: string | null;
  sentAt: string | null;
}

/** `GET /api/outlooks/:id/deliveries`. */
export interface DeliveryLog {
  outlookId: number;
  versionId: number;
  version: number;
  publishedAt: string;
  counts: Record<DeliveryStatus, number>;
  rows: DeliveryRow[];
}

export interface FuturesQuote {
  id: number;
  itemId: number;
  itemCode: string;
  seasonId: number;
  season: string;
  contract: string;
  quote: number;
  currency: string;
  quotedOn: string;
  source: string;
}

export interface FuturesQuoteInput {
  itemId: number;
  seasonId: number;
  contract: string;
  quote: number;
  currency: string;
  quotedOn: string;
  source: string;
}

export interface AccountabilitySeason {
  season: string;
  startYear: number;
  outlookId: number;
  versionId: number;
  version: number;
  publishedAt: string;
  modelRunId: number;
  status: 'complete' | 'partial' | 'awaiting records';
  items: (Comparison & { farmsReported: number; farmsProjected: number })[];
  prices: {
    item: string;
    name: string;
    priceUnit: string;
    method: string;
    expected: { low: number; base: number; high: number };
    actual: number | null;
    errorPct: number | null;
    withinRange: boolean | null;
  }[];
  farms: { farmId: number; code: string; name: string; items: Comparison[] }[];
  /** Fertiliser per nutrient: the outlook's projection, members' bookings and recorded use (server/outlook/accountability.ts). */
  fertiliser: {
    bookingRound: boolean;
    farmsWithRecords: number;
    nutrients: FertiliserComparison[];
    farms: { farmId: number; code: string; name: string; nutrients: FertiliserComparison[] }[];
    note: string;
  };
}

/** `GET /api/outlooks/accountability?version=latest|first`. */
export interface Accountability {
  version: 'latest' | 'first';
  errorSign: string;
  seasons: AccountabilitySeason[];
  summary: {
    items: { item: string; name: string; seasons: number; mape: number | null; bias: number | null; bandCoverage: number | null }[];
    prices: { item: string; seasons: number; mape: number | null; bias: number | null; rangeCoverage: number | null }[];
    farms: { farmId: number; code: string; name: string; comparisons: number; mape: number | null; bias: number | null }[];
  };
}

/** The scenario rule (margin or uniform) says what low and high mean; the words stay short. */
export const SCENARIO_LABELS: Record<string, string> = { low: 'Low scenario', base: 'Base scenario', high: 'High scenario' };

export function scenarioLabel(name: string): string {
  return SCENARIO_LABELS[name] ?? name;
}

/** The parts of `GET /api/models` rows the outlook pages read (the run to project with). */
export interface ModelListRow {
  id: number;
  name: string;
  definition: { items: string[] };
  runs: { id: number; modelId: number; status: string; finishedAt: string | null; dataHash: string }[];
}

/** Every finished run, newest first, labelled for a picker: "Model name · run #12, 2 Dec 2026". */
export function finishedRuns(models: readonly ModelListRow[]): { id: number; modelId: number; label: string; items: string[] }[] {
  return models
    .flatMap((m) =>
      m.runs
        .filter((r) => r.status === 'succeeded')
        .map((r) => ({
          id: r.id,
          modelId: m.id,
          items: m.definition.items,
          label: `${m.name} · run #${r.id}${r.finishedAt ? `, ${new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric' }).format(new Date(r.finishedAt))}` : ''}`,
        })),
    )
    .sort((a, b) => b.id - a.id);
}
