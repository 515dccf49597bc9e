import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { ACCESS, roleAllows } from '../core/access';
import { AuthStore } from '../core/auth-store';

/**
 * "Change history" beside a page's title: the audit log narrowed to one kind of record (`entity`, as the
 * audit log names it). Shown only to the roles that may read the audit log. Its host draws no box, so the
 * link sits in the page header's row like the title's other neighbours.
 */
@Component({
  selector: 'np-history-link',
  imports: [RouterLink, MatButton, MatIcon],
  template: `
    @if (canAudit()) {
      <a matButton routerLink="/admin/audit" [queryParams]="{ entity: entity() }">
        <mat-icon>history</mat-icon>
        Change history
      </a>
    }
  `,
  styles: `
    :host {
      display: contents;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HistoryLink {
  readonly #auth = inject(AuthStore);
  readonly entity = input.required<string>();
  protected readonly canAudit = computed(() => roleAllows(this.#auth.role(), ACCESS.audit));
}
