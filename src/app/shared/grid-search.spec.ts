import { ChangeDetectionStrategy, Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { GridSearch } from './grid-search';

@Component({
  imports: [GridSearch],
  template: `<np-grid-search label="Search farms" [(text)]="quickFilter" />`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
class Host {
  readonly quickFilter = signal('lark');
}

describe('GridSearch', () => {
  it('shows its label and the page’s text, and hands back what is typed', async () => {
    const fixture = TestBed.createComponent(Host);
    await fixture.whenStable();
    const root = fixture.nativeElement as HTMLElement;
    const input = root.querySelector<HTMLInputElement>('input[type=search]')!;
    expect(root.querySelector('mat-label')?.textContent).toBe('Search farms');
    expect(input.value).toBe('lark');

    input.value = 'Riverlands';
    input.dispatchEvent(new Event('input'));
    expect(fixture.componentInstance.quickFilter()).toBe('Riverlands');
  });
});
