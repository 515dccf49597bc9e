import { isSignal, type WritableSignal } from '@angular/core';
import { errorMessage } from '../core/api-error';

/**
 * Runs a request with `busy` true until it settles, so the page can disable its button meanwhile.
 * A failure goes to `failed`: a message signal (cleared before the request, then given the error's
 * words) or a function of the error; without one the error is thrown on (after `busy` is false again).
 * Resolves true when the request went through.
 */
export async function runBusy(
  busy: WritableSignal<boolean>,
  work: () => Promise<unknown>,
  failed?: WritableSignal<string | null> | ((error: unknown) => void),
): Promise<boolean> {
  const message = isSignal(failed) ? (failed as WritableSignal<string | null>) : null;
  message?.set(null);
  busy.set(true);
  try {
    await work();
    return true;
  } catch (error) {
    if (!failed) throw error;
    if (message) message.set(errorMessage(error));
    else (failed as (error: unknown) => void)(error);
    return false;
  } finally {
    busy.set(false);
  }
}
