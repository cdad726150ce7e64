import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import type { Credential } from '@evalon/contracts';
import { ApiError, messageOf } from '../../core/api-error';
import { Cautions } from '../../shared/cautions/cautions';
import { applyServerErrors } from '../../shared/forms';
import { PageHeader } from '../../shared/page-header/page-header';
import { ProctorApi } from './proctor-api';

const statusWords: Record<Credential['status'], string> = {
  valid: 'Valid',
  expiring: 'Ends within 60 days',
  expired: 'Expired',
  future: 'Not yet valid',
};

/** The proctor's licences, privileges and certificates, with a PDF upload for a new one. */
@Component({
  selector: 'ev-proctor-credentials',
  imports: [
    Cautions,
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    PageHeader,
    ReactiveFormsModule,
    RouterLink,
  ],
  template: `
    <a mat-button routerLink="/proctor"><mat-icon>arrow_back</mat-icon> Visit offers</a>
    <ev-page-header
      heading="Credentials"
      subtitle="Visits are offered only where a licence of yours is valid on every day, travel days included."
    />
    <mat-card appearance="outlined">
      <table class="creds">
        <thead>
          <tr>
            <th>Credential</th>
            <th>Kind</th>
            <th>Jurisdiction</th>
            <th>Valid</th>
            <th>Standing</th>
            <th>File</th>
          </tr>
        </thead>
        <tbody>
          @for (c of credentials(); track c.id) {
            <tr [attr.data-status]="c.status">
              <td>{{ c.title }}</td>
              <td>{{ c.kind }}</td>
              <td>{{ c.jurisdiction }}</td>
              <td>{{ c.validFrom }} to {{ c.validTo }}</td>
              <td class="status">{{ words[c.status] }}</td>
              <td>
                @if (c.hasFile) {
                  <a mat-button [href]="'/api/proctors/me/credentials/' + c.id + '/file'" download
                    ><mat-icon>picture_as_pdf</mat-icon> PDF</a
                  >
                } @else {
                  —
                }
              </td>
            </tr>
          } @empty {
            <tr>
              <td colspan="6">No credentials recorded yet.</td>
            </tr>
          }
        </tbody>
      </table>
    </mat-card>
    <mat-card appearance="outlined">
      <form [formGroup]="form" (ngSubmit)="upload()" novalidate>
        <h2 class="wide">Add a credential</h2>
        <mat-form-field appearance="outline">
          <mat-label>Kind</mat-label>
          <mat-select formControlName="kind">
            <mat-option value="licence">Licence</mat-option>
            <mat-option value="privileges">Hospital privileges</mat-option>
            <mat-option value="certificate">Certificate</mat-option>
          </mat-select>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Title</mat-label>
          <input matInput formControlName="title" />
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Jurisdiction</mat-label>
          <input matInput formControlName="jurisdiction" placeholder="US-IL or DE" />
          <mat-error>{{ form.controls.jurisdiction.errors?.['server'] }}</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Valid from</mat-label>
          <input matInput type="date" formControlName="validFrom" />
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Valid to</mat-label>
          <input matInput type="date" formControlName="validTo" />
          <mat-error>{{ form.controls.validTo.errors?.['server'] }}</mat-error>
        </mat-form-field>
        <label class="file"
          >PDF <input type="file" accept="application/pdf" (change)="pick($event)"
        /></label>
        <p class="status wide" role="status">{{ status() }}</p>
        <div class="wide">
          <button mat-flat-button type="submit" [disabled]="busy()">
            <mat-icon>upload_file</mat-icon> Record credential
          </button>
        </div>
      </form>
    </mat-card>
    <ev-cautions [topics]="['certification', 'local-rules']" />
  `,
  styles: `
    :host {
      display: grid;
      gap: 16px;
    }
    :host > a {
      justify-self: start;
    }
    mat-card {
      padding: 16px;
    }
    .creds {
      width: 100%;
      border-collapse: collapse;
    }
    .creds th,
    .creds td {
      text-align: left;
      padding: 6px 8px;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
    }
    tr[data-status='expiring'] .status {
      color: var(--mat-sys-tertiary);
      font-weight: 600;
    }
    tr[data-status='expired'] .status {
      color: var(--mat-sys-error);
      font-weight: 600;
    }
    form {
      display: grid;
      grid-template-columns: repeat(auto-fill, minmax(200px, 1fr));
      gap: 4px 16px;
    }
    .wide {
      grid-column: 1 / -1;
    }
    .file {
      align-self: center;
    }
    .status {
      min-height: 1px;
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProctorCredentials {
  private readonly api = inject(ProctorApi);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly words = statusWords;
  protected readonly credentials = signal<Credential[]>([]);
  protected readonly busy = signal(false);
  protected readonly status = signal('');
  private file: File | null = null;

  protected readonly form = new FormGroup({
    kind: new FormControl('licence', { nonNullable: true }),
    title: new FormControl('', { nonNullable: true, validators: Validators.required }),
    jurisdiction: new FormControl('', { nonNullable: true, validators: Validators.required }),
    validFrom: new FormControl('', { nonNullable: true, validators: Validators.required }),
    validTo: new FormControl('', { nonNullable: true, validators: Validators.required }),
  });

  constructor() {
    this.load();
  }

  private load(): void {
    this.api
      .profile()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((p) => this.credentials.set(p?.credentials ?? []));
  }

  protected pick(event: Event): void {
    this.file = (event.target as HTMLInputElement).files?.[0] ?? null;
  }

  protected upload(): void {
    if (!this.file) {
      this.status.set('Choose the PDF of the credential.');
      return;
    }
    this.busy.set(true);
    this.api
      .addCredential(this.form.getRawValue(), this.file)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: () => {
          this.busy.set(false);
          this.status.set('Recorded.');
          this.load();
        },
        error: (e: unknown) => {
          this.busy.set(false);
          if (e instanceof ApiError) applyServerErrors(this.form, e.fieldErrors);
          this.status.set(messageOf(e));
        },
      });
  }
}
