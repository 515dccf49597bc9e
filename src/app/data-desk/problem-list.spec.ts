import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { ProblemList, problemSummary, type RowProblem } from './problem-list';

// The error list of the messy-prices fixture as the import API answers it (tests/api/imports.test.ts).
const errors: RowProblem[] = [
  { row: 1, column: null, message: 'no column is mapped to observed_on (Observed on)' },
  { row: 4, column: 'Price', message: '"12,5x" is not a number' },
  { row: 5, column: 'Item', message: 'unknown item "barley" (items: wheat, canola)' },
  { row: 12, column: null, message: 'the row repeats row 2 (same item, season, delivery point and observed date)' },
  { row: 12, column: 'Season', message: 'unknown season "2031/32"' },
];

describe('ProblemList', () => {
  beforeEach(() => TestBed.configureTestingModule({ providers: [provideZonelessChangeDetection()] }));

  async function render(problems: RowProblem[], total: number | null = null): Promise<HTMLElement> {
    const fixture = TestBed.createComponent(ProblemList);
    fixture.componentRef.setInput('problems', problems);
    fixture.componentRef.setInput('total', total);
    fixture.componentRef.setInput('heading', 'Rows to fix');
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  it('should show every problem as row, column and message, in order', async () => {
    const el = await render(errors);
    const rows = [...el.querySelectorAll('tbody tr')].map((tr) => [...tr.querySelectorAll('td')].map((td) => td.textContent!.trim()));
    expect(rows).toEqual([
      ['1', '(header)', 'no column is mapped to observed_on (Observed on)'],
      ['4', 'Price', '"12,5x" is not a number'],
      ['5', 'Item', 'unknown item "barley" (items: wheat, canola)'],
      ['12', '(whole row)', 'the row repeats row 2 (same item, season, delivery point and observed date)'],
      ['12', 'Season', 'unknown season "2031/32"'],
    ]);
    expect(el.querySelector('h3')!.textContent!.trim()).toBe('errorRows to fix: 5 problems in 4 rows');
    expect(el.querySelector('.more')).toBeNull();
  });

  it('should say how many more problems the server counted than it listed', async () => {
    const el = await render(errors.slice(1, 3), 1250);
    expect(el.querySelector('h3')!.textContent).toContain('1,250 problems in 2 rows listed');
    expect(el.querySelector('.more')!.textContent).toContain('and 1,248 more not listed');
  });

  it('should word the summary for one problem and for file-level problems', () => {
    expect(problemSummary([{ row: 3, column: 'Price', message: 'x' }], 1)).toBe('1 problem in 1 row');
    expect(problemSummary([{ row: null, column: null, message: 'x' }], 1)).toBe('1 problem');
  });
});
