import { TestBed } from '@angular/core/testing';
import { StatusPill } from './status-pill';

describe('StatusPill', () => {
  function render(inputs: Record<string, unknown>): HTMLElement {
    const fixture = TestBed.createComponent(StatusPill);
    for (const [name, value] of Object.entries(inputs)) fixture.componentRef.setInput(name, value);
    fixture.detectChanges();
    return fixture.nativeElement.querySelector('.pill') as HTMLElement;
  }

  it('says the state in words, with the icon hidden from screen readers', () => {
    const pill = render({ label: 'Finished', icon: 'check_circle', tone: 'success' });
    expect(pill.querySelector('.label')?.textContent).toBe('Finished');
    expect(pill.querySelector('mat-icon')?.getAttribute('aria-hidden')).toBe('true');
    expect(pill.classList).toContain('success');
    expect(pill.classList).toContain('with-icon');
  });

  it('is neutral and without an icon unless told otherwise', () => {
    const pill = render({ label: 'not projected' });
    expect(pill.querySelector('mat-icon')).toBeNull();
    expect(pill.classList).toContain('neutral');
    expect(pill.classList).not.toContain('with-icon');
  });

  it('shrinks to its icon on a phone only when it has one', () => {
    expect(render({ label: 'Invited', icon: 'schedule_send', compact: true }).classList).toContain('compact');
    expect(render({ label: 'Invited', compact: true }).classList).not.toContain('compact');
  });
});
