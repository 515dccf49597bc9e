import { ChangeDetectionStrategy, Component, input, model } from '@angular/core';
import { MatFormField, MatLabel, MatPrefix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';

/**
 * The search field over a grid (its quick filter):
 * `<np-grid-search class="search" label="Search farms" [(text)]="quickFilter" />`, and the grid takes
 * `[quickFilterText]="quickFilter()"`. The page sizes the host (e.g. `flex: 0 1 360px`); the field fills it.
 */
@Component({
  selector: 'np-grid-search',
  imports: [MatFormField, MatLabel, MatPrefix, MatIcon, MatInput],
  template: `
    <mat-form-field>
      <mat-label>{{ label() }}</mat-label>
      <mat-icon matPrefix aria-hidden="true">search</mat-icon>
      <input matInput type="search" [value]="text()" (input)="text.set($any($event.target).value)" />
    </mat-form-field>
  `,
  styles: `
    :host {
      display: flex;
    }
    mat-form-field {
      flex: 1 1 auto;
      min-width: 0;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class GridSearch {
  /** The field's label, e.g. "Search farms". */
  readonly label = input.required<string>();
  /** What is typed. */
  readonly text = model('');
}
