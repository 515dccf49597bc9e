import { HttpClient, provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { apiErrorInterceptor } from './api-error-interceptor';
import { ApiRequestError } from './api-error';
import { AuthStore } from './auth-store';

describe('apiErrorInterceptor', () => {
  let http: HttpClient;
  let controller: HttpTestingController;
  let navigate: ReturnType<typeof vi.spyOn>;

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([apiErrorInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    http = TestBed.inject(HttpClient);
    controller = TestBed.inject(HttpTestingController);
    navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
  });

  afterEach(() => controller.verify());

  async function failure(url: string, respond: (req: ReturnType<HttpTestingController['expectOne']>) => void) {
    const pending = firstValueFrom(http.get(url)).catch((e: unknown) => e);
    respond(controller.expectOne(url));
    return pending;
  }

  it('should keep the server code, message and field details', async () => {
    const error = await failure('/api/users', (req) =>
      req.flush(
        { error: { code: 'invalid', message: 'Check the fields', details: [{ path: 'email', message: 'Taken' }] } },
        { status: 400, statusText: 'Bad Request' },
      ),
    );

    expect(error).toBeInstanceOf(ApiRequestError);
    const apiError = error as ApiRequestError;
    expect(apiError.status).toBe(400);
    expect(apiError.code).toBe('invalid');
    expect(apiError.message).toBe('Check the fields');
    expect(apiError.detailFor('email')).toBe('Taken');
  });

  it('should word a 502 page from a proxy in the same shape', async () => {
    const error = (await failure('/api/farms', (req) =>
      req.flush('<html>Bad gateway</html>', { status: 502, statusText: 'Bad Gateway' }),
    )) as ApiRequestError;

    expect(error.code).toBe('http_502');
    expect(error.message).toContain('HTTP 502');
  });

  it('should name a dropped connection as a network problem', async () => {
    const error = (await failure('/api/farms', (req) => req.error(new ProgressEvent('error')))) as ApiRequestError;

    expect(error.status).toBe(0);
    expect(error.code).toBe('network');
  });

  it('should send the person to sign-in when a session has ended', async () => {
    await failure('/api/farms', (req) =>
      req.flush({ error: { code: 'unauthenticated', message: 'Sign in' } }, { status: 401, statusText: 'Unauthorized' }),
    );

    expect(navigate).toHaveBeenCalledWith(['/sign-in'], expect.anything());
    expect(TestBed.inject(AuthStore).signedIn()).toBe(false);
  });

  it('should not redirect when the start-up probe /api/auth/me answers 401', async () => {
    await failure('/api/auth/me', (req) =>
      req.flush({ error: { code: 'unauthenticated', message: 'Sign in' } }, { status: 401, statusText: 'Unauthorized' }),
    );

    expect(navigate).not.toHaveBeenCalled();
  });
});
