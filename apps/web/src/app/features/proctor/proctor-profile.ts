import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { RouterLink } from '@angular/router';
import type { Model, ProctorProfile } from '@evalon/contracts';
import { ApiError, messageOf } from '../../core/api-error';
import { CatalogApi } from '../../shared/catalog-api';
import { applyServerErrors } from '../../shared/forms';
import { PageHeader } from '../../shared/page-header/page-header';
import { ProctorApi } from './proctor-api';

const list = (text: string) =>
  text
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean);

/**
 * The proctor's profile: name, home base (coordinates, zone, country), travel radius,
 * languages, rates in minor units' currency, specialties, experience per model and a short bio.
 */
@Component({
  selector: 'ev-proctor-profile',
  imports: [
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    PageHeader,
    ReactiveFormsModule,
    RouterLink,
  ],
  template: `
    <a mat-button routerLink="/proctor"><mat-icon>arrow_back</mat-icon> Visit offers</a>
    <ev-page-header
      heading="Proctor profile"
      subtitle="What hospitals see when Evalon ranks you for a visit."
    />
    <mat-card appearance="outlined">
      <form [formGroup]="form" (ngSubmit)="save()" novalidate>
        <mat-form-field appearance="outline" class="wide">
          <mat-label>Display name</mat-label>
          <input matInput formControlName="displayName" required />
          <mat-error>{{
            form.controls.displayName.errors?.['server'] ?? 'Give your name.'
          }}</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Home latitude</mat-label>
          <input matInput type="number" formControlName="homeLatitude" />
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Home longitude</mat-label>
          <input matInput type="number" formControlName="homeLongitude" />
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Time zone</mat-label>
          <input matInput formControlName="homeTimeZone" placeholder="Europe/Berlin" />
          <mat-error>{{ form.controls.homeTimeZone.errors?.['server'] }}</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Country</mat-label>
          <input matInput formControlName="homeCountry" maxlength="2" placeholder="US" />
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Travel radius (km)</mat-label>
          <input matInput type="number" formControlName="travelRadiusKm" />
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Languages</mat-label>
          <input matInput formControlName="languages" placeholder="en-US, es" />
          <mat-hint>Language tags, separated by commas</mat-hint>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Currency</mat-label>
          <input matInput formControlName="currency" maxlength="3" placeholder="USD" />
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Day rate (minor units)</mat-label>
          <input matInput type="number" formControlName="dayRate" />
          <mat-hint>250000 = 2,500.00</mat-hint>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Travel-day rate (minor units)</mat-label>
          <input matInput type="number" formControlName="travelDayRate" />
        </mat-form-field>
        <mat-form-field appearance="outline" class="wide">
          <mat-label>Specialties</mat-label>
          <input matInput formControlName="specialties" placeholder="Urology, Gynaecology" />
        </mat-form-field>
        <mat-form-field appearance="outline" class="wide">
          <mat-label>Short bio</mat-label>
          <textarea matInput rows="3" formControlName="bio" maxlength="2000"></textarea>
        </mat-form-field>
        <fieldset class="wide">
          <legend>Supervised cases per model</legend>
          @for (m of models(); track m.id) {
            <label class="exp">
              <span>{{ m.name }}</span>
              <input
                type="number"
                min="0"
                [value]="experience()[m.id] ?? 0"
                (change)="setExperience(m.id, $event)"
              />
            </label>
          }
        </fieldset>
        <p class="status wide" role="status">{{ status() }}</p>
        <div class="wide">
          <button mat-flat-button type="submit" [disabled]="busy()">
            <mat-icon>save</mat-icon> Save profile
          </button>
        </div>
      </form>
    </mat-card>
  `,
  styles: `
    :host {
      display: grid;
      gap: 16px;
    }
    :host > a {
      justify-self: start;
    }
    form {
      display: grid;
      grid-template-columns: repeat(auto-fill, minmax(220px, 1fr));
      gap: 4px 16px;
      padding: 16px;
    }
    .wide {
      grid-column: 1 / -1;
    }
    fieldset {
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 12px;
      display: grid;
      gap: 8px;
      padding: 12px 16px;
    }
    .exp {
      display: flex;
      justify-content: space-between;
      gap: 16px;
    }
    .exp input {
      width: 90px;
    }
    .status {
      min-height: 1px;
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProctorProfileEditor {
  private readonly api = inject(ProctorApi);
  private readonly catalog = inject(CatalogApi);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly form = new FormGroup({
    displayName: new FormControl('', { nonNullable: true, validators: Validators.required }),
    homeLatitude: new FormControl(0, { nonNullable: true }),
    homeLongitude: new FormControl(0, { nonNullable: true }),
    homeTimeZone: new FormControl('', { nonNullable: true }),
    homeCountry: new FormControl('', { nonNullable: true }),
    travelRadiusKm: new FormControl(500, { nonNullable: true }),
    languages: new FormControl('en', { nonNullable: true }),
    currency: new FormControl('USD', { nonNullable: true }),
    dayRate: new FormControl(0, { nonNullable: true }),
    travelDayRate: new FormControl(0, { nonNullable: true }),
    specialties: new FormControl('', { nonNullable: true }),
    bio: new FormControl('', { nonNullable: true }),
  });
  protected readonly models = signal<Model[]>([]);
  protected readonly experience = signal<Partial<Record<number, number>>>({});
  protected readonly busy = signal(false);
  protected readonly status = signal('');

  constructor() {
    this.catalog
      .models()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((m) => this.models.set(m));
    this.api
      .profile()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((p) => p && this.fill(p));
  }

  private fill(p: ProctorProfile): void {
    this.form.patchValue({
      ...p,
      languages: p.languages.join(', '),
      specialties: p.specialties.join(', '),
      bio: p.bio ?? '',
    });
    this.experience.set(Object.fromEntries(p.experience.map((e) => [e.modelId, e.declaredCases])));
  }

  protected setExperience(modelId: number, event: Event): void {
    const value = Math.max(0, Math.round(Number((event.target as HTMLInputElement).value) || 0));
    this.experience.update((e) => ({ ...e, [modelId]: value }));
  }

  protected save(): void {
    const v = this.form.getRawValue();
    this.busy.set(true);
    this.status.set('');
    this.api
      .saveProfile({
        ...v,
        homeLatitude: Number(v.homeLatitude),
        homeLongitude: Number(v.homeLongitude),
        travelRadiusKm: Number(v.travelRadiusKm),
        dayRate: Number(v.dayRate),
        travelDayRate: Number(v.travelDayRate),
        languages: list(v.languages),
        specialties: list(v.specialties),
        bio: v.bio.trim() || null,
        experience: Object.entries(this.experience()).flatMap(([modelId, n]) =>
          n ? [{ modelId: Number(modelId), declaredCases: n }] : [],
        ),
      })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (p) => {
          this.fill(p);
          this.busy.set(false);
          this.status.set('Saved.');
        },
        error: (e: unknown) => {
          this.busy.set(false);
          if (e instanceof ApiError) applyServerErrors(this.form, e.fieldErrors);
          this.status.set(messageOf(e));
        },
      });
  }
}
