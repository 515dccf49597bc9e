import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { Me } from '../../../../shared/api-types';
import { AuthStore } from '../../core/auth-store';
import { TEST_ITEMS, TEST_POINTS, TEST_SEASONS } from '../test-lookups';
import { ReferencePage } from './reference-page';

const planner: Me = { id: 2, email: 'planner@example.org', name: 'Priya Planner', role: 'planner', farmId: null };

describe('ReferencePage', () => {
  let fixture: ComponentFixture<ReferencePage>;
  let http: HttpTestingController;
  let root: HTMLElement;

  const READS: Record<string, object> = {
    '/api/items': TEST_ITEMS,
    '/api/seasons': TEST_SEASONS,
    '/api/delivery-points': TEST_POINTS,
    '/api/price-indexes': [],
  };

  async function open(tab: string | undefined): Promise<void> {
    TestBed.configureTestingModule({
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: AuthStore, useValue: { user: signal(planner), role: signal(planner.role), signedIn: signal(true) } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(ReferencePage);
    fixture.componentRef.setInput('tab', tab);
    root = fixture.nativeElement as HTMLElement;
    for (let i = 0; i < 3; i++) {
      await new Promise((r) => setTimeout(r, 0));
      TestBed.tick();
      for (const req of http.match((r) => r.method === 'GET' && r.url in READS)) req.flush(READS[req.request.url]);
    }
    await fixture.whenStable();
  }

  afterEach(() => http.verify());

  const tabLabels = () => [...root.querySelectorAll('[role=tab]')].map((t) => t.textContent!.trim());
  const selectedTab = () => root.querySelector('[role=tab][aria-selected=true]')?.textContent!.trim();
  const historyEntity = () => new URL(root.querySelector<HTMLAnchorElement>('a[href*="/admin/audit"]')!.href).searchParams.get('entity');
  const shownTable = () => root.querySelector('mat-tab-body.mat-mdc-tab-body-active np-ref-table') as HTMLElement;

  it('should show the four kinds as tabs, items first', async () => {
    await open(undefined);
    expect(tabLabels()).toEqual(['Items', 'Seasons', 'Delivery points', 'Price indexes']);
    expect(selectedTab()).toBe('Items');
    expect(historyEntity()).toBe('item');
    expect(shownTable().textContent).toContain('Outputs the members sell and inputs they buy');
    expect(shownTable().textContent).toContain('Add an item');
  });

  it('should open the tab named in the address, with its own history, words and rows', async () => {
    await open('points');
    expect(selectedTab()).toBe('Delivery points');
    expect(historyEntity()).toBe('delivery-point');
    const table = shownTable();
    expect(table.textContent).toContain('Where prices are quoted: elevators, stores, the input depot, or whole price regions.');
    expect(table.textContent).toContain('Add a point');
    expect(table.textContent).toContain('Larkfield terminal');
    expect(table.querySelector('ag-grid-angular')!.getAttribute('aria-label')).toBe('Delivery points and regions');
  });

  it('should fall back to the items for a tab it does not know', async () => {
    await open('farms');
    expect(selectedTab()).toBe('Items');
    expect(historyEntity()).toBe('item');
  });
});
