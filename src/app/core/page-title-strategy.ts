import { Injectable, inject } from '@angular/core';
import { Title } from '@angular/platform-browser';
import { TitleStrategy, type RouterStateSnapshot } from '@angular/router';

/** Gives each page a title of the form "Farms · Netput" so tabs and screen readers name the page. */
@Injectable()
export class PageTitleStrategy extends TitleStrategy {
  readonly #title = inject(Title);

  override updateTitle(snapshot: RouterStateSnapshot): void {
    const page = this.buildTitle(snapshot);
    this.#title.setTitle(page ? `${page} · Netput` : 'Netput');
  }
}
