import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, computed, effect, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatSidenavModule } from '@angular/material/sidenav';
import { MatToolbarModule } from '@angular/material/toolbar';
import { MatTooltipModule } from '@angular/material/tooltip';
import { NavigationEnd, Router, RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { filter, map } from 'rxjs';
import { SessionService } from '../core/session.service';
import { AnalysisCautionComponent } from '../ui/analysis-caution.component';
import { BrandMarkComponent } from './brand-mark.component';
import { NAV_ITEMS } from './nav-items';
import { ROLE_LABELS } from './role-label';

/** Below this width the navigation becomes an overlay drawer opened from the menu button. */
const NARROW_QUERY = '(max-width: 959.98px)';

/**
 * The signed-in frame: top bar (mark, product name, user, sign-out), side navigation and
 * the page outlet, with the analysis caution under every page. On wide screens the menu
 * button folds the navigation to an icon rail; on narrow ones it opens an overlay drawer.
 */
@Component({
  selector: 'ns-shell',
  imports: [
    AnalysisCautionComponent,
    BrandMarkComponent,
    MatButtonModule,
    MatIconModule,
    MatSidenavModule,
    MatToolbarModule,
    MatTooltipModule,
    RouterLink,
    RouterLinkActive,
    RouterOutlet,
  ],
  templateUrl: './shell.component.html',
  styleUrl: './shell.component.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ShellComponent {
  private readonly session = inject(SessionService);
  private readonly router = inject(Router);

  protected readonly narrow = toSignal(
    inject(BreakpointObserver)
      .observe(NARROW_QUERY)
      .pipe(map((state) => state.matches)),
    { initialValue: false },
  );
  /** Wide screens: navigation folded to icons. */
  protected readonly folded = signal(false);
  /** Narrow screens: overlay drawer open. */
  protected readonly drawerOpen = signal(false);
  protected readonly signingOut = signal(false);

  protected readonly user = this.session.user;
  protected readonly roleLabel = computed(() => {
    const user = this.user();
    return user ? ROLE_LABELS[user.role] : '';
  });
  protected readonly navItems = computed(() => NAV_ITEMS.filter((item) => this.session.hasRole(item.minRole)));

  constructor() {
    // Close the overlay drawer after a navigation, and when the window becomes wide again.
    this.router.events
      .pipe(filter((event) => event instanceof NavigationEnd))
      .subscribe(() => this.drawerOpen.set(false));
    effect(() => {
      if (!this.narrow()) this.drawerOpen.set(false);
    });
  }

  protected toggleNavigation(): void {
    if (this.narrow()) this.drawerOpen.update((open) => !open);
    else this.folded.update((folded) => !folded);
  }

  /** Keyboard users jump past the top bar and navigation (the router owns the URL fragment). */
  protected skipToContent(event: Event): void {
    event.preventDefault();
    document.getElementById('ns-main')?.focus();
  }

  protected async signOut(): Promise<void> {
    this.signingOut.set(true);
    try {
      await this.session.signOut();
      await this.router.navigateByUrl('/sign-in');
    } finally {
      this.signingOut.set(false);
    }
  }
}
