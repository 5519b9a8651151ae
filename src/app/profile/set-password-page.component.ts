import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { HttpContext, HttpErrorResponse } from '@angular/common/http';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { RouterLink } from '@angular/router';
import * as z from 'zod';
import { accountLinkInfoSchema } from '../../../shared/api/user-admin.js';
import { ApiService } from '../core/api.service';
import { describeHttpError } from '../core/describe-http-error';
import { CALLER_HANDLES_ERRORS } from '../core/http-context';

/** /set-password/:secret (public): choose a password through a one-time invitation or reset link. */
@Component({
  selector: 'ns-set-password-page',
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatInputModule, RouterLink],
  template: `
    <main class="card">
      <h1>Nullsmith</h1>
      @if (info.hasValue()) {
        @if (done()) {
          <p role="status">Your password is set. <a routerLink="/sign-in">Sign in</a> with {{ info.value().email }}.</p>
        } @else {
          <p>{{ info.value().purpose === 'invite' ? 'Welcome' : 'Hello' }}, {{ info.value().displayName }}. Choose a password for {{ info.value().email }}.</p>
          <form [formGroup]="form" (ngSubmit)="submit()">
            <mat-form-field class="full">
              <mat-label>New password</mat-label>
              <input matInput type="password" formControlName="password" autocomplete="new-password" />
              <mat-hint>At least 12 characters</mat-hint>
            </mat-form-field>
            @if (error()) {
              <p class="error" role="alert">{{ error() }}</p>
            }
            <button mat-flat-button type="submit" [disabled]="form.invalid">Set password</button>
          </form>
        }
      } @else if (info.error()) {
        <p class="error" role="alert">{{ linkError() }}</p>
      }
    </main>
  `,
  styles: `
    :host { display: grid; place-items: center; min-height: 100vh; background: var(--mat-sys-surface-container); }
    .card { width: min(440px, 92vw); padding: 32px; border-radius: 20px; background: var(--mat-sys-surface); }
    h1 { margin: 0 0 16px; font: var(--mat-sys-headline-small); }
    .full { width: 100%; }
    .error { color: var(--mat-sys-error); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SetPasswordPageComponent {
  private readonly api = inject(ApiService);
  readonly secret = input.required<string>();
  protected readonly done = signal(false);
  protected readonly error = signal('');
  protected readonly form = new FormGroup({
    password: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.minLength(12)] }),
  });
  private readonly quiet = { context: new HttpContext().set(CALLER_HANDLES_ERRORS, true) };
  protected readonly info = rxResource({ params: () => this.secret(), stream: ({ params }) => this.api.get(`/api/account-links/${params}`, accountLinkInfoSchema, this.quiet) });

  protected linkError(): string {
    const e = this.info.error();
    return e instanceof HttpErrorResponse ? describeHttpError(e).message : 'This link cannot be used. Ask an administrator for a new one.';
  }

  protected submit(): void {
    this.api.post(`/api/account-links/${this.secret()}`, { password: this.form.controls.password.value }, z.unknown(), this.quiet).subscribe({
      next: () => this.done.set(true),
      error: (e: unknown) => this.error.set(e instanceof HttpErrorResponse ? describeHttpError(e).message : 'The password could not be set; try again.'),
    });
  }
}
