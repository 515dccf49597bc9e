import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { BASE_CAUTIONS } from '../shared/base-cautions';
import { CautionNote } from '../shared/caution-note';

/** The outlook's cautions (the list frozen with each version), in the app's caution style. */
@Component({
  selector: 'np-outlook-cautions',
  imports: [CautionNote],
  template: `
    <np-caution-note label="Cautions">
      @for (c of lines(); track $index) {
        <p>{{ c }}</p>
      }
      @if (brief()) {
        <p class="more">The other cautions that come with these figures are at the end of the page.</p>
      }
    </np-caution-note>
  `,
  styles: `
    .more {
      font: var(--mat-sys-body-small);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class OutlookCautions {
  // inputs
  readonly cautions = input<readonly string[] | null | undefined>(null);
  /** Only the two essential cautions, pointing to the full list further down (for the top of a long page). */
  readonly brief = input(false);

  /** The server's list; the two essential ones are always there, even before it has loaded. */
  protected readonly lines = computed(() => {
    if (this.brief()) return BASE_CAUTIONS;
    const list = this.cautions() ?? [];
    const text = list.join(' ').toLowerCase();
    const extra = BASE_CAUTIONS.filter((c) => (c.startsWith('Projections') ? !text.includes('not financial advice') : !text.includes('certified adviser')));
    return [...extra, ...list];
  });
}
