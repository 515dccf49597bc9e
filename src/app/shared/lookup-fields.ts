import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { ReactiveFormsModule, type FormControl } from '@angular/forms';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatOption, MatSelect } from '@angular/material/select';
import type { Item, Season } from '../../../shared/api-types';
import { FieldError } from './field-error';

/** The seasons as a picker offers them: newest first (the API lists them oldest first). */
export function seasonsNewestFirst(seasons: readonly Season[]): Season[] {
  return [...seasons].reverse();
}

/** The season a new record starts in: the newest recorded one, or none. */
export function newestSeasonId(seasons: readonly Season[]): number | null {
  return seasonsNewestFirst(seasons)[0]?.id ?? null;
}

/**
 * A required season field of a form dialog, the seasons newest first:
 * `<np-season-field [control]="form.controls.seasonId" [seasons]="data.seasons" />`. Its host draws no
 * box, so the field is a cell of the dialog's form grid like its neighbours. That is a static host style
 * rather than a `styles` block: with Angular 21.2, two components of one file with the same inline
 * style sheet left `ng build` and `ng test` running after they had finished (seen 2026-12-04).
 */
@Component({
  selector: 'np-season-field',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatSelect, MatOption, FieldError],
  template: `
    <mat-form-field>
      <mat-label>Season</mat-label>
      <mat-select [formControl]="control()" required>
        @for (s of newestFirst(); track s.id) {
          <mat-option [value]="s.id">{{ s.label }}</mat-option>
        }
      </mat-select>
      <mat-error><np-field-error [control]="control()" required="Choose the season" /></mat-error>
    </mat-form-field>
  `,
  host: { style: 'display: contents' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SeasonField {
  readonly control = input.required<FormControl<number | null>>();
  readonly seasons = input.required<readonly Season[]>();
  protected readonly newestFirst = computed(() => seasonsNewestFirst(this.seasons()));
}

/**
 * A required item field of a form dialog, each item with its unit ("Wheat (t)"):
 * `<np-item-field label="Output" [control]="form.controls.itemId" [items]="outputs" />`. The label
 * also words the message when none is chosen ("Choose the output").
 */
@Component({
  selector: 'np-item-field',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatSelect, MatOption, FieldError],
  template: `
    <mat-form-field>
      <mat-label>{{ label() }}</mat-label>
      <mat-select [formControl]="control()" required>
        @for (it of items(); track it.id) {
          <mat-option [value]="it.id">{{ it.name }} ({{ it.unit }})</mat-option>
        }
      </mat-select>
      <mat-error><np-field-error [control]="control()" [required]="'Choose the ' + label().toLowerCase()" /></mat-error>
    </mat-form-field>
  `,
  host: { style: 'display: contents' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ItemField {
  /** "Item", or what the items offered are ("Output"). */
  readonly label = input('Item');
  readonly control = input.required<FormControl<number | null>>();
  readonly items = input.required<readonly Item[]>();
}
