import {
  AbstractControl,
  FormArray,
  FormControl,
  FormGroup,
  NonNullableFormBuilder,
  ValidationErrors,
  ValidatorFn,
  Validators,
} from '@angular/forms';
import type { Model, ModelCategory, ModelInput, PackingItem } from '@evalon/contracts';
import { modelLimits } from '@evalon/contracts/values';
import {
  amountValidator,
  gtinValidator,
  percentValidator,
  trimmedMinLength,
  wholeNumberBetween,
} from './catalog-validators';
import { amountToMinor, bpsToPercentText, percentToBps, toMajorText } from './money';

/** One row of the packing list: an item every shipment of the model carries. */
export type PackingRow = FormGroup<{
  /** Server id of an existing item (kept so the server can match it), null for a new one. */
  id: FormControl<number | null>;
  name: FormControl<string>;
  gtin: FormControl<string>;
  quantity: FormControl<number | null>;
  serialised: FormControl<boolean>;
}>;

/** The deposit rule as typed: a percentage and two amounts in major units. */
export type DepositRuleGroup = FormGroup<{
  percent: FormControl<string>;
  min: FormControl<string>;
  max: FormControl<string>;
}>;

/** The model editor's form. */
export type ModelForm = FormGroup<{
  name: FormControl<string>;
  category: FormControl<ModelCategory | ''>;
  description: FormControl<string>;
  currency: FormControl<string>;
  listValue: FormControl<string>;
  depositRule: DepositRuleGroup;
  packingList: FormArray<PackingRow>;
  compatibleModelIds: FormControl<number[]>;
}>;

/** The deposit maximum may not be below the minimum (contract: `depositRule` refinement). */
function maxNotBelowMin(currency: () => string): ValidatorFn {
  return (group: AbstractControl): ValidationErrors | null => {
    const { min, max } = (group as DepositRuleGroup).getRawValue();
    try {
      if (amountToMinor(max, currency()) < amountToMinor(min, currency())) {
        return { maxBelowMin: 'The maximum must not be below the minimum.' };
      }
    } catch {
      // An amount that does not convert has its own message on its field.
    }
    return null;
  };
}

/**
 * Builds the editor's form. `currency` reads the currency the amounts are typed in; call
 * {@link revalidateAmounts} when it changes.
 */
export function buildModelForm(fb: NonNullableFormBuilder, currency: () => string): ModelForm {
  const amount = [Validators.required, amountValidator(currency)];
  return fb.group({
    name: fb.control('', [
      Validators.required,
      trimmedMinLength(modelLimits.nameMin),
      Validators.maxLength(modelLimits.nameMax),
    ]),
    category: fb.control<ModelCategory | ''>('', Validators.required),
    description: fb.control('', Validators.maxLength(modelLimits.descriptionMax)),
    currency: fb.control('USD', Validators.required),
    listValue: fb.control('', amount),
    depositRule: fb.group(
      {
        percent: fb.control('', [Validators.required, percentValidator]),
        min: fb.control('0', amount),
        max: fb.control('', amount),
      },
      { validators: maxNotBelowMin(currency) },
    ),
    packingList: fb.array<PackingRow>([], Validators.maxLength(modelLimits.packingItemsMax)),
    compatibleModelIds: fb.control<number[]>([]),
  });
}

/** A packing-list row, empty or filled from an item of the model. */
export function buildPackingRow(fb: NonNullableFormBuilder, item?: PackingItem): PackingRow {
  return fb.group({
    id: fb.control<number | null>(item?.id ?? null),
    name: fb.control(item?.name ?? '', [
      Validators.required,
      trimmedMinLength(1),
      Validators.maxLength(modelLimits.packingNameMax),
    ]),
    gtin: fb.control(item?.gtin ?? '', gtinValidator),
    quantity: fb.control<number | null>(item?.quantity ?? 1, [
      Validators.required,
      wholeNumberBetween(modelLimits.quantityMin, modelLimits.quantityMax),
    ]),
    serialised: fb.control(item?.serialised ?? false),
  });
}

/** Re-checks every amount (after the currency changed: JPY has no decimals, BHD has three). */
export function revalidateAmounts(form: ModelForm): void {
  form.controls.listValue.updateValueAndValidity();
  const rule = form.controls.depositRule.controls;
  rule.min.updateValueAndValidity({ onlySelf: true });
  rule.max.updateValueAndValidity({ onlySelf: true });
  form.controls.depositRule.updateValueAndValidity();
}

/** Fills the form from a stored model (amounts shown in major units). */
export function fillModelForm(fb: NonNullableFormBuilder, form: ModelForm, model: Model): void {
  form.controls.packingList.clear();
  for (const item of model.packingList) {
    form.controls.packingList.push(buildPackingRow(fb, item));
  }
  form.setValue({
    name: model.name,
    category: model.category,
    description: model.description,
    currency: model.currency,
    listValue: toMajorText(model.listValue, model.currency),
    depositRule: {
      percent: bpsToPercentText(model.depositRule.percentBps),
      min: toMajorText(model.depositRule.min, model.currency),
      max: toMajorText(model.depositRule.max, model.currency),
    },
    packingList: model.packingList.map((item) => ({
      id: item.id ?? null,
      name: item.name,
      gtin: item.gtin ?? '',
      quantity: item.quantity,
      serialised: item.serialised,
    })),
    compatibleModelIds: [...model.compatibleModelIds],
  });
  form.markAsPristine();
}

/**
 * The request body for `POST/PUT /api/models` from a valid form: amounts converted exactly to
 * minor units with `@evalon/deposits`, strings trimmed as the contract does.
 * @throws when the form is not valid (callers check `form.valid` first).
 */
export function toModelInput(form: ModelForm, lenderId?: number): ModelInput {
  const value = form.getRawValue();
  const { currency } = value;
  const percentBps = percentToBps(value.depositRule.percent);
  if (!value.category || percentBps === null) throw new Error('The model form is not valid.');
  return {
    ...(lenderId !== undefined ? { lenderId } : {}),
    name: value.name.trim(),
    category: value.category,
    description: value.description.trim(),
    listValue: amountToMinor(value.listValue, currency),
    currency,
    depositRule: {
      percentBps,
      min: amountToMinor(value.depositRule.min, currency),
      max: amountToMinor(value.depositRule.max, currency),
      currency,
    },
    packingList: value.packingList.map((row) => ({
      ...(row.id !== null ? { id: row.id } : {}),
      name: row.name.trim(),
      gtin: row.gtin.trim() === '' ? null : row.gtin.trim(),
      quantity: Number(row.quantity),
      serialised: row.serialised,
    })),
    compatibleModelIds: [...new Set(value.compatibleModelIds)],
  };
}

/**
 * Where a server field message belongs in this form: the contract's `depositRule.percentBps`
 * is the `percent` field here; every other path is the same.
 */
export function formPathOf(serverPath: string): string {
  return serverPath.replace(/^depositRule\.percentBps$/, 'depositRule.percent');
}
