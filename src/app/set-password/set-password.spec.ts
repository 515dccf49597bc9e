import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { Router, provideRouter } from '@angular/router';
import type { Me, TokenInfo } from '../../../shared/api-types';
import { apiErrorInterceptor } from '../core/api-error-interceptor';
import { AuthStore } from '../core/auth-store';
import { SetPassword } from './set-password';

const TOKEN = 'tok_abcdefghijklmnopqrstuvwxyz';
const invite: TokenInfo = {
  purpose: 'invite',
  email: 'nora@example.org',
  name: 'Nora Newfield',
  expiresAt: '2030-01-08T10:00:00.000Z',
};
const nora: Me = { id: 31, email: 'nora@example.org', name: 'Nora Newfield', role: 'member', farmId: 4 };

describe('SetPassword', () => {
  let fixture: ComponentFixture<SetPassword>;
  let http: HttpTestingController;

  async function open(answer: (req: ReturnType<HttpTestingController['expectOne']>) => void): Promise<void> {
    document.cookie = 'XSRF-TOKEN=abc123; path=/';
    TestBed.configureTestingModule({
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([{ path: '**', children: [] }]),
        provideHttpClient(withInterceptors([apiErrorInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(SetPassword);
    fixture.componentRef.setInput('token', TOKEN);
    fixture.componentRef.setInput('purpose', 'invite');
    TestBed.tick();
    answer(http.expectOne(`/api/auth/tokens/${TOKEN}`));
    await fixture.whenStable();
  }

  function text(): string {
    return (fixture.nativeElement as HTMLElement).textContent?.replace(/\s+/g, ' ') ?? '';
  }

  afterEach(() => http.verify());

  it('should greet the invited person by name and e-mail address', async () => {
    await open((req) => req.flush(invite));

    expect(text()).toContain('Nora Newfield, you have been invited to Netput');
    expect(text()).toContain('nora@example.org');
  });

  it('should say the link is used up when the server answers 410', async () => {
    await open((req) =>
      req.flush({ error: { code: 'gone', message: 'This link was used' } }, { status: 410, statusText: 'Gone' }),
    );

    expect(text()).toContain('This link has expired or has already been used.');
    expect(text()).toContain("Ask the co-op's administrator to send a new invitation.");
    expect(fixture.nativeElement.querySelector('form')).toBeNull();
  });

  it('should say the link is not valid when the server does not know it', async () => {
    await open((req) =>
      req.flush({ error: { code: 'not_found', message: 'Not found' } }, { status: 404, statusText: 'Not Found' }),
    );

    expect(text()).toContain('This link is not valid.');
  });

  it('should ask for 10 characters and a matching repeat before sending anything', async () => {
    await open((req) => req.flush(invite));
    const loader = TestbedHarnessEnvironment.loader(fixture);
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue('short');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=confirm]' }))).setValue('shorter');

    await (await loader.getHarness(MatButtonHarness.with({ text: 'Set password and sign in' }))).click();

    const field = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'New password' }));
    expect(await field.getTextErrors()).toEqual(['Use at least 10 characters']);
    expect(text()).toContain('The two passwords are not the same.');
    http.expectNone(`/api/auth/tokens/${TOKEN}`);
  });

  it('should POST the password, sign the person in and go home', async () => {
    await open((req) => req.flush(invite));
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigateByUrl');
    const loader = TestbedHarnessEnvironment.loader(fixture);
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue('barley harvest tuesday');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=confirm]' }))).setValue('barley harvest tuesday');

    await (await loader.getHarness(MatButtonHarness.with({ text: 'Set password and sign in' }))).click();
    const post = await vi.waitFor(() => http.expectOne({ method: 'POST', url: `/api/auth/tokens/${TOKEN}` }));
    expect(post.request.body).toEqual({ password: 'barley harvest tuesday' });
    post.flush({ user: nora });

    await vi.waitFor(() => expect(navigate).toHaveBeenCalledWith('/', { replaceUrl: true }));
    expect(TestBed.inject(AuthStore).user()).toEqual(nora);
  });
});
