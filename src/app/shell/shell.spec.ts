import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { DEFAULT_SEASON_CALENDAR } from '../../../shared/season-calendar';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { computed, provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { CoopSettings, Me } from '../../../shared/api-types';
import type { Role } from '../../../shared/roles';
import { apiErrorInterceptor } from '../core/api-error-interceptor';
import { AuthStore } from '../core/auth-store';
import { Shell } from './shell';

const settings: CoopSettings = {
  coopName: 'Vale Grain Co-operative',
  currency: 'EUR',
  unitSystem: 'metric',
  decimalMark: 'point',
  storageCapacityT: 12000,
  handlingCapacityTPerDay: 400,
  seasonCalendar: DEFAULT_SEASON_CALENDAR,
};

function person(role: Role): Me {
  return { id: 7, email: `${role}@example.org`, name: `Test ${role}`, role, farmId: role === 'member' ? 3 : null };
}

describe('Shell', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<Shell>;

  async function render(role: Role, devMail: 'on' | 'off' | 'not-asked' = 'not-asked', outlooks: unknown[] = []): Promise<void> {
    const user = signal<Me | null>(person(role));
    TestBed.configureTestingModule({
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([apiErrorInterceptor])),
        provideHttpClientTesting(),
        {
          provide: AuthStore,
          useValue: {
            user,
            role: computed(() => user()?.role ?? null),
            signedIn: computed(() => user() !== null),
            clear: () => user.set(null),
          },
        },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(Shell);
    // Requests keep the app unstable, so answer them before waiting for stability.
    TestBed.tick();
    http.expectOne('/api/settings').flush(settings);
    // The header's season: staff read the outlook list, members their published versions.
    for (const request of http.match((r) => r.url === '/api/outlooks' || r.url === '/api/portal/outlook/versions')) request.flush(outlooks);
    if (devMail === 'on') http.expectOne('/api/dev/mail/status').flush({ available: true });
    if (devMail === 'off') http.expectOne('/api/dev/mail/status').flush({ available: false });
    await fixture.whenStable();
  }

  function navLabels(): string[] {
    const nav = (fixture.nativeElement as HTMLElement).querySelector('nav[aria-label=Main]');
    return [...(nav?.querySelectorAll('a') ?? [])].map((a) => a.textContent?.replace(/\s+/g, ' ').trim() ?? '');
  }

  function navPaths(): string[] {
    const nav = (fixture.nativeElement as HTMLElement).querySelector('nav[aria-label=Main]');
    return [...(nav?.querySelectorAll('a') ?? [])].map((a) => a.getAttribute('href') ?? '');
  }

  afterEach(() => http.verify());

  it('should show a planner the co-op pages and the audit log, but no user administration', async () => {
    await render('planner');

    expect(navPaths()).toEqual(['/', '/prices', '/farms', '/imports', '/contracts', '/reference', '/models', '/outlook', '/budget', '/admin/audit', '/account']);
    expect(navLabels().join(' | ')).not.toMatch(/Users|Co-op settings|Mail outbox/);
  });

  it('should show a member only home, their season outlook and account', async () => {
    await render('member');

    expect(navPaths()).toEqual(['/', '/my-farm/outlook', '/my-farm/bookings', '/account']);
  });

  it('should show a treasurer farms but no administration heading', async () => {
    await render('treasurer');

    expect(navPaths()).toEqual(['/', '/prices', '/farms', '/contracts', '/reference', '/models', '/outlook', '/budget', '/account']);
    expect((fixture.nativeElement as HTMLElement).textContent).not.toContain('Administration');
  });

  it('should show an admin the mail outbox only when the server keeps mail', async () => {
    await render('admin', 'on');

    expect(navPaths()).toEqual([
      '/',
      '/prices',
      '/farms',
      '/imports',
      '/contracts',
      '/reference',
      '/models',
      '/outlook',
      '/budget',
      '/admin/users',
      '/admin/settings',
      '/admin/audit',
      '/admin/mail',
      '/account',
    ]);
  });

  it('should leave the mail outbox out for an admin when the server is not in development mode', async () => {
    await render('admin', 'off');

    expect(navPaths()).not.toContain('/admin/mail');
    expect(navPaths()).toContain('/admin/users');
  });

  it("should show the co-op's name from the settings and the person's name in the header", async () => {
    await render('planner');

    const toolbar = (fixture.nativeElement as HTMLElement).querySelector('header.band');
    expect(toolbar?.textContent).toContain('Vale Grain Co-operative');
    expect(toolbar?.textContent).toContain('Test planner');
  });

  it('should carry the season being planned and its outlook state in the header', async () => {
    const draft = { id: 4, season: '2026/27', startYear: 2026, title: 'Outlook', modelRunId: 2, projectionStatus: 'succeeded', updatedAt: '2026-12-01T10:00:00Z', versions: 0, latestVersion: null };
    await render('planner', 'not-asked', [draft]);

    const season = (fixture.nativeElement as HTMLElement).querySelector('header.band .season');
    expect(season?.textContent?.replace(/\s+/g, ' ').trim()).toBe('Season 2026/27 outlook in draft');
  });

  it("should draw the planner's work pages as the season's steps: records, model, outlook, budget", async () => {
    await render('planner');

    const steps = [...(fixture.nativeElement as HTMLElement).querySelectorAll('nav[aria-label=Main] ol.path > li')].map((li) =>
      [...li.querySelectorAll('.nav-label')].map((label) => label.textContent?.trim()).join(', '),
    );
    expect(steps).toEqual(['Prices, Farms, Imports, Contracts, Reference data', 'Models', 'Outlook', 'Budget']);
  });
});
