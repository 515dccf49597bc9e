import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { RouterLink } from '@angular/router';

@Component({
  selector: 'np-not-found',
  imports: [RouterLink, MatButton, MatIcon],
  template: `
    <div class="np-page status">
      <mat-icon aria-hidden="true" class="big">wrong_location</mat-icon>
      <h1>This page does not exist</h1>
      <p>The address may be mistyped, or the page may have moved.</p>
      <a matButton="filled" routerLink="/">Go to the home page</a>
    </div>
  `,
  styleUrl: './status-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotFound {}
