import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatSnackBar } from '@angular/material/snack-bar';
import { ApiRequestError } from './api-error';
import { AppErrorHandler } from './app-error-handler';

describe('AppErrorHandler', () => {
  let handler: AppErrorHandler;
  let open: ReturnType<typeof vi.fn>;

  beforeEach(() => {
    open = vi.fn(() => ({ onAction: () => ({ subscribe: () => undefined }) }));
    TestBed.configureTestingModule({
      providers: [provideZonelessChangeDetection(), AppErrorHandler, { provide: MatSnackBar, useValue: { open } }],
    });
    handler = TestBed.inject(AppErrorHandler);
    vi.spyOn(console, 'error').mockImplementation(() => undefined);
  });

  it("should show the server's words for an API failure nobody handled", () => {
    handler.handleError(new ApiRequestError(409, { code: 'conflict', message: 'This farm already has a member' }));

    expect(open).toHaveBeenCalledWith('This farm already has a member', 'Dismiss', expect.anything());
  });

  it('should not show a programming error to the person, only a plain apology', () => {
    handler.handleError(new TypeError("Cannot read properties of undefined (reading 'farm')"));

    expect(open.mock.calls[0]?.[0]).toMatch(/^Something unexpected went wrong/);
  });

  it('should offer a reload when a lazy page could not be fetched after an update', () => {
    handler.handleError(new TypeError('Failed to fetch dynamically imported module: /chunk-ABC.js'));

    expect(open).toHaveBeenCalledWith('Netput was updated on the server. Reload the page to continue.', 'Reload');
  });

  it('should stay quiet about a 401, which already led to the sign-in page', () => {
    handler.handleError(new ApiRequestError(401, { code: 'unauthenticated', message: 'Sign in' }));

    expect(open).not.toHaveBeenCalled();
  });
});
