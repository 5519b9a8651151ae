import { HttpErrorResponse } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router } from '@angular/router';
import { loginRequestSchema } from '../../../shared/api/auth.js';
import { describeHttpError } from '../core/describe-http-error';
import { SessionService } from '../core/session.service';
import { isSafeReturnTo } from '../core/sign-in-redirect';
import { zodMessage, zodValidator } from '../core/zod-validator';
import { BrandMarkComponent } from '../shell/brand-mark.component';
import { AnalysisCautionComponent } from '../ui/analysis-caution.component';

/** /sign-in: e-mail and password, checked with the server's own schema before sending. */
@Component({
  selector: 'ns-sign-in-page',
  imports: [
    AnalysisCautionComponent,
    BrandMarkComponent,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    ReactiveFormsModule,
  ],
  templateUrl: './sign-in-page.component.html',
  styleUrl: './sign-in-page.component.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignInPageComponent {
  private readonly session = inject(SessionService);
  private readonly router = inject(Router);

  /** Page the user asked for before being sent here (query parameter, bound by the router). */
  readonly returnTo = input<string | undefined>(undefined);

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', zodValidator(loginRequestSchema.shape.email)],
    password: ['', zodValidator(loginRequestSchema.shape.password)],
  });
  protected readonly pending = signal(false);
  /** The server's refusal ("E-mail or password is wrong.", lockout, …) or a network problem. */
  protected readonly failure = signal('');
  protected readonly hidePassword = signal(true);
  protected readonly messageOf = zodMessage;

  protected async submit(): Promise<void> {
    this.failure.set('');
    const parsed = loginRequestSchema.safeParse(this.form.getRawValue());
    if (!parsed.success) {
      this.form.markAllAsTouched();
      return;
    }
    this.pending.set(true);
    this.form.disable();
    try {
      await this.session.signIn(parsed.data);
      const target = this.returnTo();
      await this.router.navigateByUrl(isSafeReturnTo(target) ? target : '/jobs');
    } catch (error) {
      this.failure.set(
        error instanceof HttpErrorResponse
          ? describeHttpError(error).message
          : 'Signing in failed in the browser. Reload the page and try again.',
      );
    } finally {
      this.pending.set(false);
      this.form.enable();
    }
  }
}
