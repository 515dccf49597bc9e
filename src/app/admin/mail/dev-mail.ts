import { DatePipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, ElementRef, inject, linkedSignal, signal, viewChild } from '@angular/core';
import { MatAnchor, MatButton } from '@angular/material/button';
import { RouterLink } from '@angular/router';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTab, MatTabGroup } from '@angular/material/tabs';
import { DomSanitizer, type SafeHtml } from '@angular/platform-browser';
import { firstValueFrom } from 'rxjs';
import type { StoredMail } from '../../../../shared/api-types';
import { errorMessage } from '../../core/api-error';
import { ConfirmDialog, type ConfirmDialogData } from '../../shared/confirm-dialog';
import { DevMailApi } from './dev-mail-api';

/** A piece of a plain-text body: text, or a web link worth making clickable. */
export type TextPart = { text: string; href?: string };

/** Splits a plain-text mail body so http(s) links (invitation and reset links) can be clicked. */
export function linkify(text: string): TextPart[] {
  const parts: TextPart[] = [];
  const pattern = /https?:\/\/[^\s<>"')]+/g;
  let last = 0;
  for (const match of text.matchAll(pattern)) {
    const start = match.index ?? 0;
    if (start > last) parts.push({ text: text.slice(last, start) });
    parts.push({ text: match[0], href: match[0] });
    last = start + match[0].length;
  }
  if (last < text.length) parts.push({ text: text.slice(last) });
  return parts;
}

/** `/admin/mail` (development mode only): what the local fake SMTP server received. */
@Component({
  selector: 'np-dev-mail',
  imports: [DatePipe, RouterLink, MatAnchor, MatButton, MatIcon, MatProgressBar, MatTabGroup, MatTab],
  templateUrl: './dev-mail.html',
  styleUrl: './dev-mail.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DevMail {
  // services
  readonly #api = inject(DevMailApi);
  readonly #dialog = inject(MatDialog);
  readonly #snackBar = inject(MatSnackBar);
  readonly #sanitizer = inject(DomSanitizer);

  protected readonly mails = httpResource<StoredMail[]>(() => '/api/dev/mail');
  protected readonly list = computed(() => (this.mails.hasValue() ? this.mails.value() : []));
  protected readonly problem = computed(() => (this.mails.error() ? errorMessage(this.mails.error()) : null));
  /** The open mail; follows the newest one until the admin picks another. */
  protected readonly selectedId = linkedSignal<StoredMail[], number | null>({
    source: this.list,
    computation: (mails, previous) =>
      previous && mails.some((m) => m.id === previous.value) ? previous.value : (mails[0]?.id ?? null),
  });
  protected readonly selected = computed(() => this.list().find((m) => m.id === this.selectedId()) ?? null);
  protected readonly textParts = computed(() => linkify(this.selected()?.text ?? ''));
  /**
   * The HTML body, shown in an iframe whose `sandbox` allows only reading its size (no scripts, no
   * forms) via `srcdoc`; the document also inherits the page's CSP, so nothing is fetched from
   * outside. Angular's sanitizer would strip the mail's styling, hence the explicit trust here.
   */
  /** Preview at a phone's width (390 px) instead of the page's. */
  protected readonly phone = signal(false);
  /** The frame's height once its document has been measured, so the whole message shows (null: not measured). */
  protected readonly frameHeight = signal<number | null>(null);

  private readonly frame = viewChild<ElementRef<HTMLIFrameElement>>('frame');

  /** Sizes the frame to the message it holds; the frame keeps a fixed height, and says so, when it cannot be read. */
  protected measure(): void {
    const frame = this.frame()?.nativeElement;
    const doc = frame?.contentDocument;
    if (!frame || !doc?.documentElement) return this.frameHeight.set(null);
    // Let the frame shrink first, so a narrower width is measured at its own height.
    frame.style.height = '0px';
    const height = Math.ceil(doc.documentElement.scrollHeight) + 2;
    frame.style.height = '';
    this.frameHeight.set(height);
  }

  /** Another width: the same document flows again, so measure it after the frame has taken the width. */
  protected setPhone(phone: boolean): void {
    this.phone.set(phone);
    setTimeout(() => this.measure());
  }

  protected readonly htmlBody = computed<SafeHtml | null>(() => {
    const html = this.selected()?.html;
    return html ? this.#sanitizer.bypassSecurityTrustHtml(html) : null;
  });

  protected async clearAll(): Promise<void> {
    const data: ConfirmDialogData = {
      title: 'Delete all stored mail?',
      message: 'The development server forgets every mail it received. Real mail is not affected.',
      confirmLabel: 'Delete all',
      destructive: true,
    };
    if (!(await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed()))) return;
    try {
      await this.#api.clear();
      this.mails.reload();
    } catch (error) {
      this.#snackBar.open(errorMessage(error), 'Dismiss');
    }
  }
}
