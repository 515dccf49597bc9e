import type { MatDialog } from '@angular/material/dialog';
import { firstValueFrom } from 'rxjs';
import type { PriceRow } from '../../../../shared/api-types';
import type { PriceInput } from '../../../../shared/data-schemas';
import { ApiRequestError } from '../../core/api-error';
import { ConfirmDialog, type ConfirmDialogData } from '../../shared/confirm-dialog';
import type { DataDeskApi } from '../data-desk-api';
import { formatPrice } from './price-chart';

/** What became of a grid edit: saved, or the row as it now stands (theirs, or unchanged). */
export type EditOutcome = { saved: PriceRow } | { kept: PriceRow; reason: string };

const ask = (dialog: MatDialog, data: ConfirmDialogData) => firstValueFrom(dialog.open(ConfirmDialog, { data, width: '34rem', maxWidth: '96vw' }).afterClosed());

/** The API's answer `{ error: { code, details, current } }`, when the error is one. */
function apiError(error: unknown): { code: string; message: string; details?: { path: string; message: string }[]; current?: PriceRow } | null {
  return error instanceof ApiRequestError ? (error.error as never) : null;
}

/**
 * Saves one edited price row. A price far from its history is asked about (422
 * `needs_confirmation`) and saved only when confirmed; when someone else saved the row meanwhile
 * (409 `stale`), both values are shown and the planner keeps theirs or takes the stored one. Other
 * refusals are thrown.
 */
export async function savePriceEdit(api: DataDeskApi, dialog: MatDialog, original: PriceRow, body: PriceInput): Promise<EditOutcome> {
  let version = original.version;
  let confirmed = false;
  for (let attempt = 0; attempt < 4; attempt++) {
    try {
      return { saved: await api.updatePrice(original.id, body, version, confirmed) };
    } catch (error) {
      const e = apiError(error);
      if (e?.code === 'needs_confirmation' && !confirmed) {
        const yes = await ask(dialog, {
          title: 'Is this price right?',
          message: (e.details?.map((d) => d.message).join('; ') ?? e.message).replace(/([^.?!])$/, '$1.'),
          confirmLabel: 'Save it anyway',
          cancelLabel: 'Go back',
        });
        if (!yes) return { kept: original, reason: 'not saved; the price far from its history was not confirmed' };
        confirmed = true;
        continue;
      }
      if (e?.code === 'stale' && e.current) {
        const theirs = e.current;
        const keep = await ask(dialog, {
          title: 'Someone else changed this price',
          message:
            `Stored now: ${formatPrice(theirs.price)} ${theirs.currency}/${theirs.unit}, ${theirs.source}, observed ${theirs.observedOn}. ` +
            `Yours: ${formatPrice(body.price)} ${body.currency}/${original.unit}, ${body.source}, observed ${body.observedOn}.`,
          confirmLabel: 'Keep mine',
          cancelLabel: 'Take theirs',
        });
        if (!keep) return { kept: theirs, reason: 'the stored value, saved by someone else, was taken' };
        version = theirs.version;
        continue;
      }
      throw error;
    }
  }
  throw new Error('The price could not be saved; reload the page and try again');
}
