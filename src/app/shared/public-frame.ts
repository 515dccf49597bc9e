import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatCard, MatCardContent } from '@angular/material/card';

/** The frame of the pages people see before they are signed in: brand, a card, a short footer. */
@Component({
  selector: 'np-public-frame',
  imports: [MatCard, MatCardContent],
  template: `
    <main class="frame">
      <header class="brand">
        <img src="favicon.svg" alt="" width="48" height="48" />
        <span class="name">Netput</span>
      </header>
      <mat-card appearance="outlined" class="card">
        <mat-card-content>
          <h1 class="heading">{{ heading() }}</h1>
          <ng-content />
        </mat-card-content>
      </mat-card>
      <footer class="footer">Supply and input-demand outlooks for farm co-operatives</footer>
    </main>
  `,
  styles: `
    :host {
      display: block;
      min-height: 100%;
      background:
        linear-gradient(180deg, var(--mat-sys-surface-container-low) 0, var(--mat-sys-surface) 320px),
        var(--mat-sys-surface);
    }
    .frame {
      box-sizing: border-box;
      max-width: 460px;
      margin: 0 auto;
      padding: 48px 16px 32px;
      display: flex;
      flex-direction: column;
      gap: 24px;
    }
    .brand {
      display: flex;
      align-items: center;
      justify-content: center;
      gap: 12px;
    }
    .brand img {
      border-radius: 12px;
    }
    .name {
      font: var(--mat-sys-headline-medium);
      color: var(--mat-sys-primary);
    }
    .card {
      padding: 8px;
    }
    .heading {
      font: var(--mat-sys-headline-small);
      margin: 8px 0 20px;
    }
    .footer {
      text-align: center;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PublicFrame {
  readonly heading = input.required<string>();
}
