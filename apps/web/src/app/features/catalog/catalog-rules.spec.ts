import {
  depotInput,
  gs1CheckDigit as contractCheckDigit,
  isValidGtin,
  maintenanceHoldInput,
  modelInput,
  photo,
  shippingSettings,
  unitInput,
  unitStatuses as contractUnitStatuses,
} from '@evalon/contracts';
import {
  countryPattern,
  depotLimits,
  gs1CheckDigit,
  gtin14Problem,
  maintenanceReasonLimits,
  modelLimits,
  padGtin,
  photoContentTypes,
  shippingLimits,
  unitLimits,
  unitStatuses,
  wallTimePattern,
} from './catalog-rules';

describe('GS1 check digit', () => {
  // GS1 General Specifications §7.9.1 (weights 3,1,3,1... from the right; (10 − sum mod 10) mod
  // 10), checked against published examples listed in /work/shared/reference-values.md.
  it.each([
    ['890400021003', 7, 'GS1 India check-digit page'],
    ['730001100001', 7, 'GS1 Sweden check-digit page'],
    ['629104150021', 3, 'reference-values.md, GS1 section'],
  ])('gives %s → %i (%s)', (data, expected) => {
    expect(gs1CheckDigit(data)).toBe(expected);
  });

  it('accepts the derived valid GTIN-14 09521234543213 and names the digit a typo breaks', () => {
    // 09521234543213 is valid (derived from the §7.9.1 rule, reference-values.md).
    expect(gtin14Problem('09521234543213')).toBeNull();
    expect(gtin14Problem('09521234543214')).toEqual({ kind: 'check', expected: 3 });
    expect(gtin14Problem('0952123454321')).toEqual({ kind: 'length' });
    expect(gtin14Problem('0952123454321A')).toEqual({ kind: 'length' });
  });

  it('agrees with the contract’s check digit and GTIN rule on many codes', () => {
    // A deterministic spread of 13-digit bodies (a linear congruential walk), not hand-picked.
    let x = 12345;
    for (let n = 0; n < 500; n++) {
      x = (x * 1103515245 + 12345) % 2147483648;
      const body = String(x).padStart(13, '7').slice(0, 13);
      expect(gs1CheckDigit(body)).toBe(contractCheckDigit(body));
      for (let last = 0; last <= 9; last++) {
        const code = `${body}${last}`;
        expect(gtin14Problem(code) === null).toBe(isValidGtin(code));
      }
    }
  });

  it('pads a valid GTIN-13, -12 or -8 to 14 digits and leaves anything else alone', () => {
    // Padding with leading zeros keeps the check digit: weights count from the right (§7.9.1).
    expect(padGtin('8904000210037')).toBe('08904000210037');
    expect(padGtin('730001100001' + '7').length).toBe(14);
    expect(gtin14Problem(padGtin('6291041500213'))).toBeNull();
    expect(padGtin('8904000210038')).toBe('8904000210038');
    expect(padGtin('12345')).toBe('12345');
  });
});

// The client restates some contract values (see catalog-rules.ts); these checks hold them to the
// contract itself, so the two cannot drift apart silently.
describe('catalogue rules restated for the browser', () => {
  const validModel = {
    name: 'Test model',
    category: 'laser' as const,
    listValue: 100,
    currency: 'USD',
    depositRule: { percentBps: 100, min: 0, max: 100, currency: 'USD' },
  };

  it('has the contract’s unit statuses and photo types', () => {
    expect(unitStatuses).toEqual([...contractUnitStatuses]);
    expect(photoContentTypes).toEqual([...photo.shape.contentType.options]);
  });

  it('has the contract’s model limits', () => {
    const name = (length: number) =>
      modelInput.safeParse({ ...validModel, name: 'x'.repeat(length) }).success;
    expect(name(modelLimits.nameMin)).toBe(true);
    expect(name(modelLimits.nameMin - 1)).toBe(false);
    expect(name(modelLimits.nameMax)).toBe(true);
    expect(name(modelLimits.nameMax + 1)).toBe(false);
    const description = (length: number) =>
      modelInput.safeParse({ ...validModel, description: 'x'.repeat(length) }).success;
    expect(description(modelLimits.descriptionMax)).toBe(true);
    expect(description(modelLimits.descriptionMax + 1)).toBe(false);
    const item = (quantity: number, nameLength = 4) =>
      modelInput.safeParse({
        ...validModel,
        packingList: [{ name: 'x'.repeat(nameLength), gtin: null, quantity, serialised: false }],
      }).success;
    expect(item(modelLimits.quantityMin)).toBe(true);
    expect(item(modelLimits.quantityMin - 1)).toBe(false);
    expect(item(modelLimits.quantityMax)).toBe(true);
    expect(item(modelLimits.quantityMax + 1)).toBe(false);
    expect(item(1, modelLimits.packingNameMax)).toBe(true);
    expect(item(1, modelLimits.packingNameMax + 1)).toBe(false);
    const bps = (percentBps: number) =>
      modelInput.safeParse({
        ...validModel,
        depositRule: { ...validModel.depositRule, percentBps },
      }).success;
    expect(bps(modelLimits.percentBpsMax)).toBe(true);
    expect(bps(modelLimits.percentBpsMax + 1)).toBe(false);
  });

  it('has the contract’s unit, depot and maintenance limits', () => {
    const serial = (length: number) =>
      unitInput.safeParse({ modelId: 1, serialNumber: 'x'.repeat(length), homeDepotId: 1 }).success;
    expect(serial(unitLimits.serialMax)).toBe(true);
    expect(serial(unitLimits.serialMax + 1)).toBe(false);

    const depot = {
      name: 'East depot',
      addressLine: '1 Quay Road',
      city: 'Harbourtown',
      country: 'US',
      latitude: 40,
      longitude: -74,
      timeZone: 'America/New_York',
      cutoffTime: '15:00',
    };
    const depotWith = (change: Record<string, unknown>) =>
      depotInput.safeParse({ ...depot, ...change }).success;
    expect(depotWith({})).toBe(true);
    expect(depotWith({ name: 'x'.repeat(depotLimits.nameMax + 1) })).toBe(false);
    expect(depotWith({ name: 'x'.repeat(depotLimits.nameMin - 1) })).toBe(false);
    expect(depotWith({ addressLine: 'x'.repeat(depotLimits.addressMin - 1) })).toBe(false);
    expect(depotWith({ city: 'x'.repeat(depotLimits.cityMax + 1) })).toBe(false);
    expect(depotWith({ receivingHours: 'x'.repeat(depotLimits.receivingHoursMax + 1) })).toBe(
      false,
    );
    for (const time of ['00:00', '15:00', '23:59', '24:00', '7:00', '15:60']) {
      expect(wallTimePattern.test(time)).toBe(depotWith({ cutoffTime: time }));
    }
    for (const country of ['US', 'DE', 'USA', 'u1']) {
      expect(countryPattern.test(country)).toBe(depotWith({ country }));
    }

    const reason = (length: number) =>
      maintenanceHoldInput.safeParse({
        start: '2027-03-01',
        end: '2027-03-02',
        reason: 'x'.repeat(length),
      }).success;
    expect(reason(maintenanceReasonLimits.min)).toBe(true);
    expect(reason(maintenanceReasonLimits.min - 1)).toBe(false);
    expect(reason(maintenanceReasonLimits.max)).toBe(true);
    expect(reason(maintenanceReasonLimits.max + 1)).toBe(false);
  });

  it('has the contract’s shipping-settings limits', () => {
    const settings = {
      distanceBands: [{ maxKm: null, days: 1 }],
      customsDays: 0,
      leadDays: 2,
      firstLoanLeadDays: 3,
      decontaminationDays: 1,
      turnaroundDays: 2,
    };
    const valid = (change: Record<string, unknown>) =>
      shippingSettings.safeParse({ ...settings, ...change }).success;
    expect(valid({})).toBe(true);
    expect(valid({ customsDays: shippingLimits.daysMax })).toBe(true);
    expect(valid({ customsDays: shippingLimits.daysMax + 1 })).toBe(false);
    expect(valid({ leadDays: shippingLimits.leadDaysMin })).toBe(true);
    expect(valid({ leadDays: shippingLimits.leadDaysMin - 1 })).toBe(false);
    expect(valid({ firstLoanLeadDays: shippingLimits.leadDaysMin - 1 })).toBe(false);
    const bands = (count: number) =>
      valid({
        distanceBands: [
          ...Array.from({ length: count - 1 }, (_, i) => ({ maxKm: (i + 1) * 100, days: 1 })),
          { maxKm: null, days: 2 },
        ],
      });
    expect(bands(shippingLimits.bandsMin)).toBe(true);
    expect(bands(shippingLimits.bandsMax)).toBe(true);
    expect(bands(shippingLimits.bandsMax + 1)).toBe(false);
  });
});
