import { BreakpointObserver } from '@angular/cdk/layout';
import { NgTemplateOutlet } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  Injector,
  afterNextRender,
  computed,
  inject,
  viewChild,
} from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatDivider } from '@angular/material/divider';
import { MatIcon } from '@angular/material/icon';
import { MatMenu, MatMenuItem, MatMenuTrigger } from '@angular/material/menu';
import { MatSidenav, MatSidenavContainer, MatSidenavContent } from '@angular/material/sidenav';
import { MatSnackBar } from '@angular/material/snack-bar';
import { NavigationEnd, Router, RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { filter, map, skip } from 'rxjs';
import { ROLE_LABELS } from '../../../shared/roles';
import { errorMessage } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { DevMailAvailability } from '../core/dev-mail-availability';
import { navItemsFor, SEASON_STAGES } from '../core/navigation';
import { SeasonStatus } from '../core/season-status';
import { SettingsStore } from '../core/settings-store';

/** Side navigation is docked from this width up; below it, it slides over the page. */
export const WIDE_LAYOUT_QUERY = '(min-width: 960px)';

@Component({
  selector: 'np-shell',
  imports: [
    NgTemplateOutlet,
    RouterOutlet,
    RouterLink,
    RouterLinkActive,
    MatIcon,
    MatIconButton,
    MatButton,
    MatMenu,
    MatMenuItem,
    MatMenuTrigger,
    MatDivider,
    MatSidenav,
    MatSidenavContainer,
    MatSidenavContent,
  ],
  templateUrl: './shell.html',
  styleUrl: './shell.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Shell {
  // services
  readonly #auth = inject(AuthStore);
  readonly #settings = inject(SettingsStore);
  readonly #devMail = inject(DevMailAvailability);
  readonly #router = inject(Router);
  readonly #snackBar = inject(MatSnackBar);
  readonly #injector = inject(Injector);
  readonly #season = inject(SeasonStatus);

  protected readonly sidenav = viewChild.required(MatSidenav);
  private readonly content = viewChild.required(MatSidenavContent);
  protected readonly main = viewChild.required<ElementRef<HTMLElement>>('main');

  protected readonly user = this.#auth.user;
  protected readonly roleLabel = computed(() => {
    const role = this.#auth.role();
    return role ? ROLE_LABELS[role] : '';
  });
  protected readonly coopName = this.#settings.coopName;
  protected readonly season = this.#season.current;
  protected readonly initials = computed(() =>
    (this.user()?.name ?? '')
      .split(/\s+/)
      .filter(Boolean)
      .slice(0, 2)
      .map((part) => part[0]!.toUpperCase())
      .join(''),
  );
  protected readonly isWide = toSignal(
    inject(BreakpointObserver)
      .observe(WIDE_LAYOUT_QUERY)
      .pipe(map((state) => state.matches)),
    { initialValue: true },
  );

  protected readonly navItems = computed(() =>
    navItemsFor(this.#auth.role(), { devMail: this.#devMail.available() }),
  );
  /** Home and the pages outside the season's steps (a member's outlook). */
  protected readonly topItems = computed(() => this.navItems().filter((item) => item.group === undefined && item.stage === undefined));
  /** The season's work, step by step, with the pages of each step this role may open. */
  protected readonly stages = computed(() =>
    SEASON_STAGES.map((stage) => ({ ...stage, items: this.navItems().filter((item) => item.stage === stage.key) })).filter((stage) => stage.items.length > 0),
  );
  protected readonly adminItems = computed(() => this.navItems().filter((item) => item.group === 'admin'));
  protected readonly personalItems = computed(() => this.navItems().filter((item) => item.group === 'personal'));

  constructor() {
    // After each in-app navigation, close the overlay menu on phones and move focus to the page,
    // so keyboard and screen-reader users start reading the new page rather than the old link.
    this.#router.events
      .pipe(
        filter((event) => event instanceof NavigationEnd),
        skip(1),
        takeUntilDestroyed(),
      )
      .subscribe(() => {
        if (!this.isWide()) void this.sidenav().close();
        this.#season.refresh();
        // The page scrolls inside the sidenav content, not the window, so the router cannot reset it.
        this.content().scrollTo({ top: 0 });
        afterNextRender(() => this.main().nativeElement.focus({ preventScroll: true }), { injector: this.#injector });
      });
  }

  protected skipToMain(event: Event): void {
    event.preventDefault();
    this.main().nativeElement.focus();
  }

  protected async signOut(): Promise<void> {
    try {
      await this.#auth.signOut();
    } catch (error) {
      this.#snackBar.open(errorMessage(error, 'Signing out failed on the server; you are signed out here.'), 'Dismiss');
    }
    await this.#router.navigateByUrl('/sign-in');
  }
}
