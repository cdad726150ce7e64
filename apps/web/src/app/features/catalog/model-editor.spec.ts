import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ChangeDetectionStrategy, Component } from '@angular/core';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MatChipListboxHarness } from '@angular/material/chips/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { Router, provideRouter } from '@angular/router';
import type { ModelInput } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { SessionStore } from '../../core/session-store';
import { membership, person } from '../../testing/people';
import { fleetModel, fleetModels, lenderId } from './fleet-fixtures';
import { ModelEditor } from './model-editor';

@Component({ template: '', changeDetection: ChangeDetectionStrategy.OnPush })
class Blank {}

const listUrl = `/api/models?lenderId=${lenderId}`;

describe('ModelEditor', () => {
  let fixture: ComponentFixture<ModelEditor>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  async function settle(): Promise<void> {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  }

  async function open(modelId?: string): Promise<void> {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([{ path: 'catalog/models/:modelId', component: Blank }]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(SessionStore).setUser(
      person([membership('dralvik', 'fleet_manager')], { email: 'fleet@dralvik.example' }),
    );
    fixture = TestBed.createComponent(ModelEditor);
    if (modelId !== undefined) fixture.componentRef.setInput('modelId', modelId);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
  }

  afterEach(() => http.verify());

  const input = (selector: string) => loader.getHarness(MatInputHarness.with({ selector }));
  const field = (label: string | RegExp) =>
    loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
  const saveButton = () =>
    loader.getHarness(MatButtonHarness.with({ text: /List the model|Save changes/ }));

  describe('a new model', () => {
    beforeEach(async () => {
      await open();
      http.expectOne(listUrl).flush({ items: fleetModels });
      await settle();
    });

    it('says in plain words what each required field needs', async () => {
      await (await saveButton()).click();
      await settle();
      expect(await (await field('Model name')).getTextErrors()).toEqual([
        'Give the model a name of at least 2 characters.',
      ]);
      expect(await (await field('Category')).getTextErrors()).toEqual([
        'Choose the kind of equipment.',
      ]);
      expect(await (await field('List value of one unit')).getTextErrors()).toEqual([
        'Enter the list value.',
      ]);
      expect(await (await field('Deposit share')).getTextErrors()).toEqual([
        'Enter the share, e.g. 2 or 12.5.',
      ]);
      expect(await (await field('Maximum deposit')).getTextErrors()).toEqual([
        'Enter the maximum.',
      ]);
      expect(fixture.nativeElement.querySelector('[role="alert"]').textContent).toContain(
        'Some fields need attention',
      );
      // Nothing was sent.
      http.expectNone('/api/models');
    });

    it('refuses amounts the currency cannot hold and a maximum below the minimum', async () => {
      const listValue = await input('[formControlName="listValue"]');
      await listValue.setValue('1250.505');
      await listValue.blur();
      expect(await (await field('List value of one unit')).getTextErrors()).toEqual([
        'USD has 2 decimal places at most.',
      ]);

      // JPY has no minor unit (ISO 4217 exponent 0, docs/references.md "Money and payments").
      await (
        await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName="currency"]' }))
      ).clickOptions({ text: 'JPY' });
      await listValue.setValue('1250.50');
      await settle();
      expect(await (await field('List value of one unit')).getTextErrors()).toEqual([
        'JPY has no decimal places: enter a whole amount.',
      ]);

      await (await input('[formControlName="min"]')).setValue('5000');
      const max = await input('[formControlName="max"]');
      await max.setValue('4000');
      await max.blur();
      expect(fixture.nativeElement.querySelector('.rule-feedback').textContent).toContain(
        'The maximum must not be below the minimum.',
      );
    });

    it('checks each GTIN’s GS1 check digit and pads shorter GTINs', async () => {
      await (await loader.getHarness(MatButtonHarness.with({ text: /Add item/ }))).click();
      const gtin = await input('[aria-label="Item 1 GTIN"]');
      const gtinField = await loader.getHarness(
        MatFormFieldHarness.with({ selector: '.col-gtin mat-form-field' }),
      );

      // 890400021003 → check digit 7 (GS1 India check-digit page, docs/references.md).
      await gtin.setValue('08904000210038');
      await gtin.blur();
      expect(await gtinField.getTextErrors()).toEqual([
        'The last digit is not the GS1 check digit (it should be 7). Check for a typing error.',
      ]);
      await gtin.setValue('08904000210037');
      await gtin.blur();
      expect(await gtinField.getTextErrors()).toEqual([]);

      // 730001100001 → 7 (GS1 Sweden check-digit page): a valid GTIN-13 is padded to 14 digits.
      await gtin.setValue('7300011000017');
      await gtin.blur();
      expect(await gtin.getValue()).toBe('07300011000017');
      expect(await gtinField.getTextErrors()).toEqual([]);

      // 629104150021 → 3 (docs/references.md): the wrong last digit stays unpadded and flagged.
      await gtin.setValue('6291041500214');
      await gtin.blur();
      expect(await gtin.getValue()).toBe('6291041500214');
      expect(await gtinField.getTextErrors()).toEqual([
        'A GTIN here has 14 digits. Pad a shorter GTIN-8, -12 or -13 with leading zeros.',
      ]);
    });

    it('sends amounts as exact minor units and opens the saved model', async () => {
      await (await input('[formControlName="name"]')).setValue('  Dralvik V9 imaging tower ');
      await (
        await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName="category"]' }))
      ).clickOptions({ text: 'Imaging tower' });
      await (await input('[formControlName="description"]')).setValue('Camera, light and monitor.');
      await (await input('[formControlName="listValue"]')).setValue('95,000.10');
      await (await input('[formControlName="percent"]')).setValue('12.5');
      await (await input('[formControlName="min"]')).setValue('5000');
      await (await input('[formControlName="max"]')).setValue('15000.00');
      await (await loader.getHarness(MatButtonHarness.with({ text: /Add item/ }))).click();
      await (await input('[aria-label="Item 1 name"]')).setValue('Camera control unit');
      // 09521234543213 is a valid GTIN-14 (derived, docs/references.md).
      await (await input('[aria-label="Item 1 GTIN"]')).setValue('09521234543213');
      await (await input('[aria-label="Item 1 quantity"]')).setValue('2');
      await (await loader.getHarness(MatCheckboxHarness)).check();
      const chips = await loader.getHarness(MatChipListboxHarness);
      await chips.selectChips({ text: /Dralvik L3 laser/ });

      expect(fixture.nativeElement.querySelector('.preview').textContent).toContain('$11,875.01');

      await (await saveButton()).click();
      const request = http.expectOne('/api/models');
      expect(request.request.method).toBe('POST');
      const body: ModelInput = request.request.body;
      expect(body).toEqual({
        lenderId,
        name: 'Dralvik V9 imaging tower',
        category: 'imaging',
        description: 'Camera, light and monitor.',
        listValue: 9_500_010,
        currency: 'USD',
        depositRule: { percentBps: 1250, min: 500_000, max: 1_500_000, currency: 'USD' },
        packingList: [
          { name: 'Camera control unit', gtin: '09521234543213', quantity: 2, serialised: true },
        ],
        compatibleModelIds: [43],
      });
      request.flush(
        { model: fleetModel({ id: 77, name: body.name }) },
        { status: 201, statusText: 'Created' },
      );
      await settle();
      expect(TestBed.inject(Router).url).toBe('/catalog/models/77');
    });

    it('puts the server’s field messages on the matching fields', async () => {
      await (await input('[formControlName="name"]')).setValue('Dralvik V9 imaging tower');
      await (
        await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName="category"]' }))
      ).clickOptions({ text: 'Imaging tower' });
      await (await input('[formControlName="listValue"]')).setValue('1000');
      await (await input('[formControlName="percent"]')).setValue('10');
      await (await input('[formControlName="max"]')).setValue('100');
      await (await saveButton()).click();
      http.expectOne('/api/models').flush(
        {
          error: {
            code: 'validation_failed',
            message: 'Some fields need attention.',
            details: {
              fieldErrors: { 'depositRule.percentBps': ['Too high for this category.'] },
              formErrors: [],
            },
          },
        },
        { status: 422, statusText: 'Unprocessable Entity' },
      );
      await settle();
      expect(await (await field('Deposit share')).getTextErrors()).toEqual([
        'Too high for this category.',
      ]);
    });
  });

  describe('an existing model', () => {
    beforeEach(async () => {
      await open('41');
      http.expectOne(listUrl).flush({ items: fleetModels });
      http.expectOne('/api/models/41').flush({ model: fleetModels[0] });
      await settle();
    });

    it('shows stored minor units as major units and saves them back unchanged', async () => {
      expect(await (await input('[formControlName="listValue"]')).getValue()).toBe('28000.00');
      expect(await (await input('[formControlName="percent"]')).getValue()).toBe('20');
      expect(await (await input('[formControlName="min"]')).getValue()).toBe('2000.00');
      expect(await (await input('[formControlName="max"]')).getValue()).toBe('8000.00');
      expect(await (await input('[aria-label="Item 2 name"]')).getValue()).toBe('Leak tester');

      await (await input('[aria-label="Item 2 name"]')).setValue('Leak tester with case');
      await (await saveButton()).click();
      const request = http.expectOne('/api/models/41');
      expect(request.request.method).toBe('PUT');
      const body: ModelInput = request.request.body;
      expect(body.lenderId).toBeUndefined();
      expect(body.listValue).toBe(2_800_000);
      expect(body.depositRule).toEqual({
        percentBps: 2000,
        min: 200_000,
        max: 800_000,
        currency: 'USD',
      });
      expect(body.packingList).toEqual([
        { id: 901, name: 'Ureteroscope', gtin: '02000000000008', quantity: 1, serialised: true },
        { id: 902, name: 'Leak tester with case', gtin: null, quantity: 1, serialised: false },
      ]);
      request.flush({ model: { ...fleetModels[0], packingList: body.packingList } });
      await settle();
      expect(await (await input('[aria-label="Item 2 name"]')).getValue()).toBe(
        'Leak tester with case',
      );
    });

    it('reorders and removes packing-list items', async () => {
      await (
        await loader.getHarness(
          MatButtonHarness.with({ selector: '[aria-label="Move item 2 up"]' }),
        )
      ).click();
      expect(await (await input('[aria-label="Item 1 name"]')).getValue()).toBe('Leak tester');
      await (
        await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Remove item 2"]' }))
      ).click();
      await (await saveButton()).click();
      const request = http.expectOne('/api/models/41');
      expect((request.request.body as ModelInput).packingList).toEqual([
        { id: 902, name: 'Leak tester', gtin: null, quantity: 1, serialised: false },
      ]);
      request.flush({
        model: { ...fleetModels[0], packingList: request.request.body.packingList },
      });
      await settle();
    });

    it('offers the lender’s other models as compatible, not the model itself', async () => {
      const chips = await (await loader.getHarness(MatChipListboxHarness)).getChips();
      const texts = await Promise.all(chips.map((c) => c.getText()));
      expect(texts).toEqual([
        expect.stringContaining('Dralvik A5 robotic platform'),
        expect.stringContaining('Dralvik L3 laser'),
      ]);
    });
  });
});
