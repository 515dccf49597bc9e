import { ErrorHandler, Injectable, Injector, inject } from '@angular/core';
import { MatSnackBar } from '@angular/material/snack-bar';
import { ApiRequestError } from './api-error';

const UNEXPECTED = "Something unexpected went wrong. Try again; if it keeps happening, tell the co-op's administrator.";

function isChunkLoadFailure(error: unknown): boolean {
  const message = error instanceof Error ? error.message : String(error);
  return /Failed to fetch dynamically imported module|Importing a module script failed|error loading dynamically imported module/i.test(
    message,
  );
}

/**
 * Last stop for errors no screen handled: log them for the developer and tell the person in words
 * they can act on. Screens show the errors they expect (a wrong password, a failed save) themselves.
 */
@Injectable()
export class AppErrorHandler implements ErrorHandler {
  // The snack bar is looked up lazily: this handler is created before most of the app exists.
  readonly #injector = inject(Injector);

  handleError(error: unknown): void {
    console.error(error);
    // 401: the API interceptor already sent the person to the sign-in page.
    if (error instanceof ApiRequestError && error.status === 401) return;
    try {
      const snackBar = this.#injector.get(MatSnackBar);
      if (isChunkLoadFailure(error)) {
        snackBar
          .open('Netput was updated on the server. Reload the page to continue.', 'Reload')
          .onAction()
          .subscribe(() => location.reload());
        return;
      }
      const message = error instanceof ApiRequestError ? error.message : UNEXPECTED;
      snackBar.open(message, 'Dismiss', { duration: 10000 });
    } catch (reportingFailure) {
      console.error('Could not show the error to the user', reportingFailure);
    }
  }
}
