import { ChangeDetectionStrategy, Component, inject, output, signal } from '@angular/core';
import { FormControl, FormGroup, type FormGroupDirective, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { ROLES, type Role } from '../../../shared/roles.js';
import { userActionResponseSchema, type UserActionResponse } from '../../../shared/api/user-admin.js';
import { ApiService } from '../core/api.service';
import { ROLE_LABELS } from '../shell/role-label';

/** Create an account with a password, or invite one (no password: a one-time link is mailed). */
@Component({
  selector: 'ns-user-create-form',
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatInputModule, MatSelectModule],
  template: `
    <form [formGroup]="form" #fd="ngForm" (ngSubmit)="submit(fd)" class="row">
      <mat-form-field><mat-label>Name</mat-label><input matInput formControlName="displayName" required /></mat-form-field>
      <mat-form-field><mat-label>E-mail</mat-label><input matInput type="email" formControlName="email" required /></mat-form-field>
      <mat-form-field>
        <mat-label>Role</mat-label>
        <mat-select formControlName="role">
          @for (r of roles; track r) {
            <mat-option [value]="r">{{ labels[r] }}</mat-option>
          }
        </mat-select>
      </mat-form-field>
      <mat-form-field>
        <mat-label>Password (leave empty to invite)</mat-label>
        <input matInput type="password" formControlName="password" autocomplete="new-password" />
        <mat-hint>At least 12 characters</mat-hint>
      </mat-form-field>
      <button mat-flat-button type="submit" [disabled]="busy() || form.invalid">{{ form.controls.password.value ? 'Create account' : 'Send invitation' }}</button>
    </form>
    @if (outcome(); as o) {
      <p class="note" role="status">
        @if (o.link === undefined) {
          Account {{ o.user.email }} created.
        } @else if (o.mailed) {
          Invitation mailed to {{ o.user.email }}; it is in the Outbox.
        } @else {
          Mail could not be sent. Pass this one-time link on by hand: <span class="mono">{{ o.link }}</span>
        }
      </p>
    }
  `,
  styles: `
    .row { display: flex; gap: 12px; flex-wrap: wrap; align-items: baseline; }
    .note { margin: 4px 0 0; }
    .mono { font-family: 'Roboto Mono', monospace; word-break: break-all; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UserCreateFormComponent {
  private readonly api = inject(ApiService);
  readonly created = output<void>();
  protected readonly roles = ROLES;
  protected readonly labels = ROLE_LABELS;
  protected readonly busy = signal(false);
  protected readonly outcome = signal<UserActionResponse | null>(null);
  protected readonly form = new FormGroup({
    displayName: new FormControl('', { nonNullable: true, validators: [Validators.required] }),
    email: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.email] }),
    role: new FormControl<Role>('analyst', { nonNullable: true }),
    password: new FormControl('', { nonNullable: true, validators: [Validators.minLength(12)] }),
  });

  protected submit(fd: FormGroupDirective): void {
    const v = this.form.getRawValue();
    this.busy.set(true);
    this.api.post('/api/users', { ...v, password: v.password || undefined }, userActionResponseSchema).subscribe({
      next: (o) => {
        this.outcome.set(o);
        fd.resetForm({ displayName: '', email: '', role: 'analyst', password: '' });
        this.busy.set(false);
        this.created.emit();
      },
      error: () => this.busy.set(false),
    });
  }
}
