/**
 * The simulation options every banded estimate opens with (the season projection, projection.ts;
 * the forecast projection, forecast.ts; the contracted evaluation, contracted.ts): the number of
 * draws, the seed and the bands' central probability, with their defaults, and the farm list that
 * must not be empty. One place, so the three say the same about the same bad option.
 */
import { EstimationInputError } from './errors.js';

export interface DrawOptionRules {
  /** The estimate, as the messages name it ("the projection", "the contracted evaluation"). */
  what: string;
  /** Draws when the caller gives none. */
  defaultDraws: number;
  /** 0 draws is allowed and means the point only (no bands). */
  pointOnly?: boolean;
}

export interface DrawSettings {
  draws: number;
  seed: number;
  level: number;
}

/**
 * Draws (default `rules.defaultDraws`; a whole number of at least 100, or 0 with `pointOnly`), seed
 * (default 1) and level (default 0.9; strictly between 0 and 1), then at least one farm.
 * @throws EstimationInputError naming the option and the value given, or the estimate without farms.
 */
export function drawSettings(options: { draws?: number | undefined; seed?: number | undefined; level?: number | undefined; farms: readonly unknown[] }, rules: DrawOptionRules): DrawSettings {
  const draws = options.draws ?? rules.defaultDraws;
  const seed = options.seed ?? 1;
  const level = options.level ?? 0.9;
  if (rules.pointOnly) {
    if (!(Number.isInteger(draws) && (draws === 0 || draws >= 100))) throw new EstimationInputError(`draws must be 0 (the point only) or a whole number of at least 100, got ${draws}`);
  } else if (!(Number.isInteger(draws) && draws >= 100)) throw new EstimationInputError(`draws must be a whole number of at least 100, got ${draws}`);
  if (!(level > 0 && level < 1)) throw new EstimationInputError(`level must lie between 0 and 1, got ${level}`);
  if (!options.farms.length) throw new EstimationInputError(`${rules.what} needs at least one farm`);
  return { draws, seed, level };
}
