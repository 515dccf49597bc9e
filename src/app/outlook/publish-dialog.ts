import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';

export interface PublishDialogData {
  season: string;
  version: number;
  hasCommentary: boolean;
  /** Items for which the model did not beat the plain per-hectare rule in its back-test, in words. */
  weakItems: { item: string; sentence: string }[];
}

export interface PublishChoice {
  notifyMembers: boolean;
  /** The planner read the warning about weak items and publishes anyway (kept with the version). */
  acceptWeakSkill: boolean;
}

/** Asks before publishing a version, which can never be changed afterwards, and whether to e-mail the members. */
@Component({
  selector: 'np-publish-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton, MatCheckbox],
  template: `
    <h2 mat-dialog-title>Publish version {{ data.version }} of the {{ data.season }} outlook?</h2>
    <mat-dialog-content class="content">
      <p>
        The published version is a frozen copy: season, model run, expected prices, scenarios, projection, your commentary and the
        cautions. It cannot be changed afterwards; publishing again makes version {{ data.version + 1 }}.
      </p>
      <p>Members read it in their portal with their own farm's figures only.</p>
      @if (data.weakItems.length) {
        <div class="warn-box" role="alert">
          <p><strong>The model did not beat a plain rule for every item.</strong></p>
          <ul>
            @for (w of data.weakItems; track w.item) {
              <li>{{ w.sentence }}</li>
            }
          </ul>
          <p>For these items the farm's own average per hectare times its land would have come closer in past seasons.</p>
          <mat-checkbox [checked]="accept()" (change)="accept.set($event.checked)">
            Publish anyway; the warning is kept with the version
          </mat-checkbox>
        </div>
      }
      @if (!data.hasCommentary) {
        <p class="warn">The commentary is empty: members will see the figures without your words.</p>
      }
      <mat-checkbox [checked]="notify()" (change)="notify.set($event.checked)">
        E-mail each member who has not opted out a personal copy
      </mat-checkbox>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button matButton type="button" [mat-dialog-close]="undefined">Cancel</button>
      <button
        matButton="filled"
        type="button"
        [disabled]="data.weakItems.length > 0 && !accept()"
        [mat-dialog-close]="{ notifyMembers: notify(), acceptWeakSkill: data.weakItems.length > 0 && accept() }"
        cdkFocusInitial
      >
        Publish version {{ data.version }}
      </button>
    </mat-dialog-actions>
  `,
  styles: `
    .content p {
      margin: 0 0 10px;
      max-width: 60ch;
    }
    .warn {
      color: var(--mat-sys-error);
    }
    .warn-box {
      border-left: 4px solid var(--mat-sys-error);
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
      padding: 8px 12px;
      margin-bottom: 10px;
      border-radius: 4px;
      max-width: 60ch;
    }
    .warn-box ul {
      margin: 0 0 8px;
      padding-left: 20px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PublishDialog {
  protected readonly data = inject<PublishDialogData>(MAT_DIALOG_DATA);
  protected readonly notify = signal(true);
  protected readonly accept = signal(false);
}
