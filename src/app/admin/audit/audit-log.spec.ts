import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter } from '@angular/router';
import { AuditLog, type AuditPage } from './audit-log';

describe('AuditLog', () => {
  it('should show each entry as the sentence and changed fields the server describes, not codes', async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])] });
    const fixture = TestBed.createComponent(AuditLog);
    fixture.detectChanges();
    const page: AuditPage = {
      total: 1,
      rows: [
        {
          id: 1,
          at: '2026-12-03T10:00:00.000Z',
          actorEmail: 'admin@example.org',
          actorName: 'Ada Admin',
          action: 'user.update',
          entity: 'user',
          entityId: '24',
          sentence: 'Ada Admin changed the account of Sam Second.',
          changes: [{ label: 'farm', before: 'none', after: 'Hollybrook Farm' }],
        },
      ],
    };
    TestBed.inject(HttpTestingController).expectOne((r) => r.url === '/api/audit').flush(page);
    await fixture.whenStable();
    fixture.detectChanges();
    const text = (fixture.nativeElement as HTMLElement).textContent ?? '';
    expect(text).toContain('Ada Admin changed the account of Sam Second.');
    expect(text).toContain('farm');
    expect(text).toContain('Hollybrook Farm');
    expect(text).not.toContain('user.update');
    expect(text).not.toContain('user #24');
  });
});
