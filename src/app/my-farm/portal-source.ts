import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { RouterLink } from '@angular/router';
import { ExpectationsTable } from '../outlook/expectations-table';
import type { MemberVersion } from '../outlook/outlook-api-types';
import { SourceFacts } from '../outlook/source-facts';

/**
 * The portal's "Where the numbers come from": one plain sentence for the member, and the method —
 * the model's facts, how each price was set and the scenario rule — one click away behind
 * "How this was made", for the planner or an adviser who wants to check the figures.
 */
@Component({
  selector: 'np-portal-source',
  imports: [RouterLink, SourceFacts, ExpectationsTable],
  template: `
    @let o = version();
    <h2 id="source-heading">Where the numbers come from</h2>
    <p>{{ o.plain.source }}</p>
    <details class="how">
      <summary>How this was made</summary>
      <p class="np-muted small">The method, for the co-op's planner or an adviser who wants to check the figures.</p>
      <np-source-facts [snapshot]="o" />
      <h3>How each price was set</h3>
      <p class="np-muted small">{{ o.scenarioRuleText }}</p>
      <np-expectations-table [expectations]="o.expectations" [compact]="true" />
    </details>
    <p class="np-muted small">Your e-mail settings are under <a routerLink="/account">Account</a>.</p>
  `,
  styles: `
    :host {
      display: block;
    }
    .small {
      font: var(--mat-sys-body-small);
    }
    .how {
      summary {
        cursor: pointer;
        color: var(--mat-sys-primary);
        font: var(--mat-sys-label-large);
      }
      &[open] summary {
        margin-bottom: 8px;
      }
      > p {
        margin: 0 0 8px;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PortalSource {
  // inputs
  readonly version = input.required<MemberVersion>();
}
