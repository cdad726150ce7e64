import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  input,
  signal,
  untracked,
} from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatChipsModule } from '@angular/material/chips';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatTooltipModule } from '@angular/material/tooltip';
import { Router, RouterLink } from '@angular/router';
import type { Model, Photo } from '@evalon/contracts';
import { depositForModel, formatMoney } from '@evalon/deposits';
import { firstValueFrom, map, startWith } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { Cautions } from '../../shared/cautions/cautions';
import { confirmAction } from '../../shared/confirm-dialog/confirm-dialog';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { applyServerErrors } from '../../shared/forms';
import { PageHeader } from '../../shared/page-header/page-header';
import { LenderCatalogApi } from './lender-catalog-api';
import {
  modelCategories,
  modelCategoryLabels,
  modelLimits,
  padGtin,
} from '@evalon/contracts/values';
import { ModelPhotos } from './model-photos';
import {
  buildModelForm,
  buildPackingRow,
  fillModelForm,
  formPathOf,
  revalidateAmounts,
  toModelInput,
} from './model-form';
import { amountToMinor, commonCurrencies, isKnownCurrency, percentToBps } from './money';
import { activeLender } from '../../shared/active-lender';

/**
 * Lists a new model or edits one: details, list value and deposit rule (typed in major units,
 * sent as exact minor units), packing list with GTINs, compatible models and photos.
 */
@Component({
  selector: 'ev-model-editor',
  imports: [
    Cautions,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatCheckboxModule,
    MatChipsModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    MatTooltipModule,
    ModelPhotos,
    PageHeader,
    ReactiveFormsModule,
    RouterLink,
  ],
  templateUrl: './model-editor.html',
  styleUrl: './model-editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ModelEditor {
  private readonly api = inject(LenderCatalogApi);
  private readonly fb = inject(NonNullableFormBuilder);
  private readonly router = inject(Router);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);

  /** `:modelId` from the route; absent on `models/new`. */
  readonly modelId = input<string | undefined>(undefined);

  protected readonly categories = modelCategories;
  protected readonly categoryLabels = modelCategoryLabels;
  protected readonly limits = modelLimits;

  protected readonly form = buildModelForm(this.fb, () => this.form?.controls.currency.value ?? '');
  protected readonly packingRows = this.form.controls.packingList;

  protected readonly id = computed(() => {
    const raw = this.modelId();
    const id = raw ? Number(raw) : NaN;
    return Number.isInteger(id) && id > 0 ? id : null;
  });
  /** Whether this page lists a new model (no id yet). */
  protected readonly isNew = computed(() => this.modelId() === undefined);
  protected readonly lender = activeLender();

  protected readonly model = signal<Model | null>(null);
  protected readonly photos = signal<Photo[]>([]);
  /** Other models of the lender, offered as compatible. */
  private readonly lenderModels = signal<Model[]>([]);
  protected readonly loading = signal(false);
  protected readonly loadError = signal<string | null>(null);
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);
  /** Whether the last save went through (so leaving the page does not ask). */
  private saved = false;

  protected readonly compatibleChoices = computed(() => {
    const own = this.id();
    return this.lenderModels()
      .filter((m) => m.id !== own)
      .sort((a, b) => a.name.localeCompare(b.name));
  });

  protected readonly currencies = computed(() => {
    const current = this.model()?.currency;
    return current && !commonCurrencies.includes(current)
      ? [...commonCurrencies, current]
      : commonCurrencies;
  });

  private readonly formValue = toSignal(
    this.form.valueChanges.pipe(
      startWith(null),
      map(() => this.form.getRawValue()),
    ),
    { initialValue: this.form.getRawValue() },
  );

  /** The deposit one unit needs under the typed rule, or null until the amounts are valid. */
  protected readonly depositPreview = computed(() => {
    const value = this.formValue();
    const { currency } = value;
    if (!isKnownCurrency(currency)) return null;
    try {
      const percentBps = percentToBps(value.depositRule.percent);
      if (percentBps === null) return null;
      const rule = {
        percentBps,
        min: amountToMinor(value.depositRule.min, currency),
        max: amountToMinor(value.depositRule.max, currency),
        currency,
      };
      const listValue = amountToMinor(value.listValue, currency);
      if (rule.max < rule.min) return null;
      return formatMoney(depositForModel(listValue, rule), currency);
    } catch {
      return null;
    }
  });

  protected readonly heading = computed(() =>
    this.isNew() ? 'List a new model' : (this.model()?.name ?? 'Model'),
  );

  constructor() {
    this.form.controls.currency.valueChanges
      .pipe(takeUntilDestroyed())
      .subscribe(() => queueMicrotask(() => revalidateAmounts(this.form)));

    effect(() => {
      const lender = this.lender();
      const id = this.id();
      const isNew = this.isNew();
      untracked(() => void this.load(lender?.id ?? null, isNew ? null : id, isNew));
    });
  }

  /** Whether there are edits that leaving the page would lose. */
  hasUnsavedChanges(): boolean {
    return this.form.dirty && !this.saved;
  }

  protected reload(): void {
    const isNew = this.isNew();
    void this.load(this.lender()?.id ?? null, isNew ? null : this.id(), isNew);
  }

  protected addPackingItem(): void {
    this.packingRows.push(buildPackingRow(this.fb));
    this.packingRows.markAsDirty();
    // Put the cursor in the new row's name, so items can be typed one after another.
    queueMicrotask(() => {
      const inputs = document.querySelectorAll<HTMLInputElement>('input[data-packing-name]');
      inputs.item(inputs.length - 1)?.focus();
    });
  }

  protected removePackingItem(index: number): void {
    this.packingRows.removeAt(index);
    this.packingRows.markAsDirty();
  }

  protected movePackingItem(index: number, by: -1 | 1): void {
    const target = index + by;
    if (target < 0 || target >= this.packingRows.length) return;
    const row = this.packingRows.at(index);
    this.packingRows.removeAt(index, { emitEvent: false });
    this.packingRows.insert(target, row);
    this.packingRows.markAsDirty();
  }

  /** Pads a valid GTIN-8/12/13 to 14 digits when the field is left. */
  protected padGtinOf(index: number): void {
    const control = this.packingRows.at(index).controls.gtin;
    const padded = padGtin(control.value);
    if (padded !== control.value) control.setValue(padded);
  }

  protected async save(): Promise<void> {
    this.form.markAllAsTouched();
    this.problem.set(null);
    if (this.saving()) return;
    if (this.form.invalid) {
      this.problem.set('Some fields need attention: they are marked in red.');
      // Take people to the first field that needs them.
      queueMicrotask(() =>
        document
          .querySelector<HTMLElement>(
            'ev-model-editor :is(input, textarea, mat-select, mat-chip-listbox).ng-invalid',
          )
          ?.focus(),
      );
      return;
    }
    const lender = this.lender();
    if (!lender) return;
    const id = this.id();
    const isNew = this.isNew();
    this.saving.set(true);
    try {
      const request = toModelInput(this.form, isNew ? lender.id : undefined);
      const model = await firstValueFrom(
        isNew || id === null ? this.api.createModel(request) : this.api.updateModel(id, request),
      );
      this.saved = true;
      this.form.markAsPristine();
      if (isNew) {
        this.notifier.success(`${model.name} is listed. Add photos and units next.`);
        await this.router.navigate(['/catalog/models', model.id]);
      } else {
        this.applyModel(model);
        this.notifier.success(`${model.name} is saved.`);
      }
    } catch (error) {
      const mapped =
        error instanceof ApiError
          ? Object.fromEntries(
              Object.entries(error.fieldErrors).map(([path, message]) => [
                formPathOf(path),
                message,
              ]),
            )
          : {};
      if (error instanceof ApiError && error.code === 'model_name_taken') {
        this.form.controls.name.setErrors({ server: error.message });
        this.form.controls.name.markAsTouched();
      } else if (!(error instanceof ApiError && applyServerErrors(this.form, mapped))) {
        this.problem.set(messageOf(error));
      } else {
        this.problem.set(error.message);
      }
    } finally {
      this.saving.set(false);
    }
  }

  /** Goes back to the list, asking first when edits would be lost. */
  protected async cancel(): Promise<void> {
    await this.router.navigate(['/catalog']);
  }

  private async load(lenderId: number | null, id: number | null, isNew: boolean): Promise<void> {
    this.loadError.set(null);
    if (lenderId === null) {
      this.loadError.set('Switch to a lender organisation to edit its catalog.');
      return;
    }
    if (!isNew && id === null) {
      this.loadError.set('This address does not name a model.');
      return;
    }
    this.loading.set(true);
    try {
      const [models, model] = await Promise.all([
        firstValueFrom(this.api.models(lenderId)),
        id !== null ? firstValueFrom(this.api.model(id)) : Promise.resolve(null),
      ]);
      this.lenderModels.set(models.filter((m) => m.lenderId === lenderId));
      if (model) {
        this.applyModel(model);
        if (!model.editable) this.form.disable();
      } else {
        this.model.set(null);
        this.photos.set([]);
      }
      this.saved = false;
    } catch (error) {
      this.loadError.set(messageOf(error));
    } finally {
      this.loading.set(false);
    }
  }

  private applyModel(model: Model): void {
    this.model.set(model);
    this.photos.set(model.photos);
    fillModelForm(this.fb, this.form, model);
  }

  /** Confirms leaving with unsaved edits (used by the route's `canDeactivate`). */
  confirmLeave(): Promise<boolean> {
    if (!this.hasUnsavedChanges()) return Promise.resolve(true);
    return firstValueFrom(
      confirmAction(this.dialog, {
        title: 'Leave without saving?',
        message: 'Your changes to this model have not been saved and will be lost.',
        confirmLabel: 'Leave',
        cancelLabel: 'Keep editing',
        destructive: true,
      }),
    );
  }
}
