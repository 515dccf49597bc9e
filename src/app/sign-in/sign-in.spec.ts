import { provideHttpClient, withInterceptors, withXsrfConfiguration } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { Router, provideRouter } from '@angular/router';
import type { Me } from '../../../shared/api-types';
import { apiErrorInterceptor } from '../core/api-error-interceptor';
import { AuthStore } from '../core/auth-store';
import { SignIn } from './sign-in';

const planner: Me = { id: 2, email: 'planner@example.org', name: 'Pat Planner', role: 'planner', farmId: null };

describe('SignIn', () => {
  let loader: HarnessLoader;
  let http: HttpTestingController;
  let root: HTMLElement;
  let fixture: ComponentFixture<SignIn>;

  beforeEach(async () => {
    document.cookie = 'XSRF-TOKEN=; expires=Thu, 01 Jan 1970 00:00:00 GMT; path=/';
    TestBed.configureTestingModule({
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([{ path: '**', children: [] }]),
        provideHttpClient(
          withXsrfConfiguration({ cookieName: 'XSRF-TOKEN', headerName: 'X-XSRF-TOKEN' }),
          withInterceptors([apiErrorInterceptor]),
        ),
        provideHttpClientTesting(),
      ],
    });
    fixture = TestBed.createComponent(SignIn);
    root = fixture.nativeElement as HTMLElement;
    loader = TestbedHarnessEnvironment.loader(fixture);
    http = TestBed.inject(HttpTestingController);
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  async function field(label: string): Promise<MatFormFieldHarness> {
    return loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
  }

  async function submit(): Promise<void> {
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Sign in' }))).click();
  }

  it('should show what is missing and send nothing when the form is empty', async () => {
    await submit();

    expect(await (await field('E-mail')).getTextErrors()).toEqual(['Enter your e-mail address']);
    expect(await (await field('Password')).getTextErrors()).toEqual(['Enter your password']);
    http.expectNone(() => true);
  });

  it('should use the shared schema message for a malformed e-mail address', async () => {
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue('not-an-address');
    await submit();

    expect(await (await field('E-mail')).getTextErrors()).toEqual(['Enter a valid e-mail address']);
  });

  it('should fetch the XSRF cookie, POST the credentials to /api/auth/login and go to the return URL', async () => {
    const router = TestBed.inject(Router);
    const navigate = vi.spyOn(router, 'navigateByUrl');
    fixture.componentRef.setInput('returnUrl', '/farms');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue('planner@example.org');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue('netput-demo');

    await submit();
    // No XSRF-TOKEN cookie yet, so the store asks for one before the first POST.
    const csrf = http.expectOne('/api/auth/csrf');
    expect(csrf.request.method).toBe('GET');
    document.cookie = 'XSRF-TOKEN=abc123; path=/';
    csrf.flush(null, { status: 204, statusText: 'No Content' });

    const login = await vi.waitFor(() => http.expectOne('/api/auth/login'));
    expect(login.request.method).toBe('POST');
    expect(login.request.body).toEqual({ email: 'planner@example.org', password: 'netput-demo' });
    expect(login.request.headers.get('X-XSRF-TOKEN')).toBe('abc123');
    login.flush({ user: planner });

    await vi.waitFor(() => expect(navigate).toHaveBeenCalledWith('/farms'));
    expect(TestBed.inject(AuthStore).user()).toEqual(planner);
  });

  it("should show the server's message when the password is wrong", async () => {
    document.cookie = 'XSRF-TOKEN=abc123; path=/';
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue('planner@example.org');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue('wrong-password');

    await submit();
    const login = await vi.waitFor(() => http.expectOne('/api/auth/login'));
    login.flush(
      { error: { code: 'invalid_credentials', message: 'The e-mail address or password is not right.' } },
      { status: 401, statusText: 'Unauthorized' },
    );

    await vi.waitFor(() =>
      expect(root.querySelector('[role=alert]')?.textContent?.trim()).toBe('The e-mail address or password is not right.'),
    );
    expect(TestBed.inject(AuthStore).signedIn()).toBe(false);
  });
});
