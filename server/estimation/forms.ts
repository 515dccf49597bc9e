import { EstimationInputError } from './errors.js';
import { generalizedLeontief } from './gl.js';
import type { FormName, ProfitForm } from './model.js';
import { normalizedQuadratic } from './nq.js';

const FORMS: Record<FormName, ProfitForm> = {
  'normalized-quadratic': normalizedQuadratic,
  'generalized-leontief': generalizedLeontief,
};

/** The form's implementation from its full name. */
export function formOf(name: FormName): ProfitForm {
  return FORMS[name];
}

/** Accept 'nq' / 'gl' or the full names. */
export function resolveFormName(name: string | undefined): FormName {
  if (name === undefined || name === 'nq' || name === 'normalized-quadratic') return 'normalized-quadratic';
  if (name === 'gl' || name === 'generalized-leontief') return 'generalized-leontief';
  throw new EstimationInputError(`unknown functional form "${name}" (use nq or gl)`);
}
