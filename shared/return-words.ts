/**
 * What a profit-function "profit" is: revenue from the modelled outputs less the cost of the
 * modelled variable inputs, at the given prices. Land rent, machinery, buildings, the farm
 * family's own labour and every cost outside the model are not deducted, so it is not a farm's
 * profit. One wording for the model pages, the outlook, the member portal and e-mail.
 */
export const RETURN_NAME = 'return over the modelled variable inputs';

/** Heading for the figure: "Return over modelled variable inputs, average farm". */
export const RETURN_HEADING = 'Return over modelled variable inputs, average farm';

/** The sentence that says what the figure leaves out. */
export const RETURN_NOTE =
  'Returns over the modelled variable inputs only: revenue from the modelled outputs less the cost of the modelled inputs; land, machinery, buildings and other costs outside the model are not deducted, so this is not a farm profit.';
