import { provideHttpClient } from '@angular/common/http';
import { provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { AuthStore } from '../core/auth-store';
import { BookingsApi } from './bookings-api';
import { MemberBookings } from './member-bookings';

/** The treasurer's booking round form: each field says what is wrong with it, with the shared limits. */
describe('MemberBookings, the booking round form', () => {
  async function openForm() {
    const saved: unknown[] = [];
    TestBed.configureTestingModule({
      imports: [MemberBookings],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: AuthStore, useValue: { hasRole: () => true } },
        { provide: BookingsApi, useValue: { saveRound: async (body: unknown) => (saved.push(body), { id: 1 }) } },
      ],
    });
    const fixture = TestBed.createComponent(MemberBookings);
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    [...el.querySelectorAll<HTMLButtonElement>('button')].find((b) => b.textContent?.includes('Open a booking round'))!.click();
    fixture.detectChanges();
    const form = el.querySelector<HTMLFormElement>('form.round-form')!;
    const type = (name: string, value: string) => {
      const input = form.querySelector<HTMLInputElement>(`input[formcontrolname="${name}"]`)!;
      input.value = value;
      input.dispatchEvent(new Event('input'));
    };
    // Not whenStable: the page's reads (httpResource) stay pending against the testing backend.
    const submit = async () => {
      form.dispatchEvent(new Event('submit'));
      fixture.detectChanges();
    };
    const errors = () => [...form.querySelectorAll('mat-error')].map((e) => e.textContent!.trim());
    return { type, submit, errors, saved };
  }

  it('an empty form names each field it needs and sends nothing', async () => {
    const f = await openForm();
    await f.submit();
    expect(f.errors()).toEqual([
      'Enter the season, e.g. 2026/27',
      'Choose the budget whose prices members book at',
      'Enter the deadline as YYYY-MM-DD, e.g. 2027-01-31',
      'Enter the VAT rate on fertiliser, 0 to 50 %',
    ]);
    expect(f.saved).toEqual([]);
  });

  it('says what the server would: a season whose years do not follow, a date not in YYYY-MM-DD, VAT above the 50 % limit', async () => {
    const f = await openForm();
    f.type('season', '2026/28');
    f.type('discountDeadline', '31/01/2027');
    f.type('vatPct', '60');
    await f.submit();
    expect(f.errors()).toEqual([
      'The second year must follow the first, e.g. 2026/27',
      'Choose the budget whose prices members book at',
      'Use YYYY-MM-DD, e.g. 2027-01-31',
      'A VAT rate above 50 % is not plausible',
    ]);
    f.type('vatPct', '-1');
    await f.submit();
    expect(f.errors().at(-1)).toBe('VAT cannot be negative');
    expect(f.saved).toEqual([]);
  });
});
