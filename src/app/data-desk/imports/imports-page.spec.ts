import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { Me } from '../../../../shared/api-types';
import { apiErrorInterceptor } from '../../core/api-error-interceptor';
import { AuthStore } from '../../core/auth-store';
import { TEST_ITEMS, TEST_POINTS, TEST_SEASONS } from '../test-lookups';
import type { ImportView } from './imports-api';
import { ImportsPage, fileProblem } from './imports-page';

const planner: Me = { id: 2, email: 'planner@example.org', name: 'Priya Planner', role: 'planner', farmId: null };

/** An import as the API answers it after reading a small, partly wrong price file. */
function view(over: Partial<ImportView> = {}): ImportView {
  return {
    id: 41,
    kind: 'prices',
    fileName: 'bids.csv',
    fileSize: 612,
    status: 'validated',
    createdAt: '2026-12-01T09:00:00.000Z',
    createdBy: 'Priya Planner',
    committedAt: null,
    progress: { done: 0, total: 1 },
    format: 'csv',
    encoding: 'utf-8',
    delimiter: ',',
    decimalMark: 'point',
    warningCount: 0,
    warnings: [],
    unknownSeasons: [],
    sheet: null,
    headerRow: 1,
    columns: ['item', 'season', 'delivery_point', 'price', 'observed_on'],
    fields: [
      { field: 'item', label: 'Item', required: true },
      { field: 'price', label: 'Price', required: true },
    ],
    suggestedMapping: { item: 'item', price: 'price' },
    mapping: { item: 'item', price: 'price' },
    ignoredColumns: [],
    preview: [
      { row: 2, cells: ['wheat', '2024/25', 'Larkfield terminal', '231.5', '2024-08-20'] },
      { row: 3, cells: ['wheat', '2024/25', 'Larkfield terminal', '12,5x', '2024-08-21'] },
      { row: 4, cells: ['barley', '2024/25', 'Larkfield terminal', '190', '2024-08-22'] },
    ],
    totalRows: 3,
    validRows: 1,
    errorCount: 2,
    errors: [
      { row: 3, column: 'price', message: '"12,5x" is not a number' },
      { row: 4, column: 'item', message: 'unknown item "barley" (items: wheat, nitrogen, diesel)' },
    ],
    errorsNotShown: 0,
    notes: [],
    toWrite: { prices: 1, records: 0, factors: 0, contracts: 0 },
    existing: { prices: 0, records: 0, factors: 0, contracts: 0 },
    existingRows: 0,
    deliveryPoint: null,
    onExisting: null,
    counts: null,
    countsByTable: null,
    failure: null,
    commitStartedAt: null,
    ...over,
  };
}

describe('fileProblem', () => {
  it('should refuse a file over 20 MB before sending it, saying the limits', () => {
    expect(fileProblem({ name: 'prices.csv', size: 25 * 1024 * 1024 })).toBe(
      '“prices.csv” is 25 MB; the limit is 20 MB (and 200,000 rows). Split it into smaller files and import them one after another.',
    );
    expect(fileProblem({ name: 'prices.csv', size: 20 * 1024 * 1024 })).toBeNull();
  });

  it('should refuse what is not CSV or XLSX, and an empty file', () => {
    expect(fileProblem({ name: 'prices.xls', size: 10 })).toContain('is not a CSV or XLSX file');
    expect(fileProblem({ name: 'prices.csv', size: 0 })).toBe('“prices.csv” is empty.');
  });
});

describe('ImportsPage', () => {
  let fixture: ComponentFixture<ImportsPage>;
  let http: HttpTestingController;
  let root: HTMLElement;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([apiErrorInterceptor])),
        provideHttpClientTesting(),
        { provide: AuthStore, useValue: { user: signal(planner), role: signal(planner.role), signedIn: signal(true) } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(ImportsPage);
    root = fixture.nativeElement as HTMLElement;
    await settle();
  });

  afterEach(() => http.verify());

  /** The page's reads: reference data and the list of recent imports. */
  const READS: Record<string, object> = {
    '/api/items': TEST_ITEMS,
    '/api/seasons': TEST_SEASONS,
    '/api/delivery-points': TEST_POINTS,
    '/api/price-indexes': [],
    '/api/imports': [],
  };
  function answerReads(): void {
    for (const req of http.match((r) => r.method === 'GET' && r.url in READS)) req.flush(READS[req.request.url]);
  }

  /**
   * Lets promises and effects run and answers the page's reads, then waits for the page to be stable
   * (an unanswered request keeps it busy, so they are answered first).
   */
  async function settle(): Promise<void> {
    for (let i = 0; i < 3; i++) {
      await new Promise((r) => setTimeout(r, 0));
      TestBed.tick();
      answerReads();
    }
    await fixture.whenStable();
  }

  async function choose(file: File): Promise<void> {
    const input = root.querySelector<HTMLInputElement>('input[type=file]')!;
    Object.defineProperty(input, 'files', { value: [file], configurable: true });
    input.dispatchEvent(new Event('change'));
  }

  function problems(): string[][] {
    return [...root.querySelectorAll('np-problem-list tbody tr')].map((tr) => [...tr.querySelectorAll('td')].map((td) => td.textContent!.trim()));
  }

  it('should upload the file as the chosen kind and list every bad row, with no way to commit', async () => {
    await choose(new File(['item,season\n'], 'bids.csv', { type: 'text/csv' }));
    const upload = http.expectOne({ method: 'POST', url: '/api/imports' });
    const body = upload.request.body as FormData;
    expect(body.get('kind')).toBe('prices');
    expect((body.get('file') as File).name).toBe('bids.csv');
    upload.flush(view());
    await settle();

    expect(problems()).toEqual([
      ['3', 'price', '"12,5x" is not a number'],
      ['4', 'item', 'unknown item "barley" (items: wheat, nitrogen, diesel)'],
    ]);
    expect(root.textContent).toContain('Rows to fix before anything is written: 2 problems in 2 rows');
    expect([...root.querySelectorAll('.preview td.bad')].map((td) => td.textContent!.trim())).toEqual(['12,5x', 'barley']);
    expect([...root.querySelectorAll('button')].some((b) => /Commit/.test(b.textContent ?? ''))).toBe(false);
  });

  it('should say why an oversized file is not sent', async () => {
    const big = new File(['x'], 'huge.csv');
    Object.defineProperty(big, 'size', { value: 21 * 1024 * 1024 });
    await choose(big);
    await settle();
    http.expectNone({ method: 'POST', url: '/api/imports' });
    expect(root.querySelector('.failure')!.textContent).toContain('“huge.csv” is 21 MB; the limit is 20 MB');
  });

  it('should commit a clean file with the planner’s choice for existing rows and follow the progress to the end', async () => {
    await choose(new File(['item\n'], 'bids.csv'));
    http.expectOne({ method: 'POST', url: '/api/imports' }).flush(
      view({ errorCount: 0, errors: [], validRows: 3, toWrite: { prices: 3, records: 0, factors: 0, contracts: 0 }, existing: { prices: 1, records: 0, factors: 0, contracts: 0 }, existingRows: 1 }),
    );
    await settle();
    expect(root.textContent).toContain('No problems found');
    expect(root.textContent).toContain('1 of them are already stored');

    const skip = [...root.querySelectorAll<HTMLInputElement>('input[type=radio]')].find((r) => r.value === 'skip')!;
    skip.click();
    await settle();
    [...root.querySelectorAll('button')].find((b) => b.textContent!.includes('Commit 3 rows'))!.click();

    const commit = http.expectOne({ method: 'POST', url: '/api/imports/41/commit' });
    expect(commit.request.body).toEqual({ onExisting: 'skip', acceptWarnings: false });
    commit.flush({ id: 41, status: 'committing', progress: { done: 0, total: 3 } });
    await new Promise((r) => setTimeout(r, 300));
    http.expectOne('/api/imports/41').flush(view({ errorCount: 0, errors: [], status: 'committing', progress: { done: 2, total: 3 } }));
    await settle();
    expect(root.querySelector('np-job-progress')!.textContent!.trim()).toBe('2 of 3 rows written (67%)');

    await new Promise((r) => setTimeout(r, 300));
    http
      .expectOne('/api/imports/41')
      .flush(view({ errorCount: 0, errors: [], status: 'committed', committedAt: '2026-12-01T09:01:00.000Z', progress: { done: 3, total: 3 }, counts: { inserted: 2, updated: 0, skipped: 1 } }));
    await settle();
    expect(root.querySelector('np-job-progress')!.textContent!.trim()).toBe('3 of 3 rows written (100%)');
    expect(root.querySelector('.done')!.textContent).toContain('2 added, 0 updated, 1 skipped.');
  });
});
