import { GS, Gs1ParseError, buildElementString, buildSscc, parseElementString } from '@evalon/gs1';
import { renderGs1128, renderGs1DataMatrix } from '@evalon/gs1/render';
import {
  BarcodeFormat,
  BinaryBitmap,
  DecodeHintType,
  HybridBinarizer,
  MultiFormatReader,
  RGBLuminanceSource,
} from '@zxing/library';
import { PNG } from 'pngjs';

// Round trip through a general-purpose reader: bwip-js draws the barcode, ZXing (the pure-JS
// port of the ZXing barcode library) reads the PNG back, and our parser must find the same
// fields. The reader, not our code, decides how FNC1 comes out.

const NOW = new Date('2026-12-04T12:00:00Z');

/** Decodes a PNG the way a camera scanner would: luminance → binarizer → reader. */
function decodePng(png: Buffer, format: BarcodeFormat): string {
  const { width, height, data } = PNG.sync.read(png);
  const luminance = new Uint8ClampedArray(width * height);
  for (let i = 0; i < width * height; i++) {
    const [r, g, b, a] = [data[4 * i]!, data[4 * i + 1]!, data[4 * i + 2]!, data[4 * i + 3]! / 255];
    // ITU-R BT.601 luma, over white where the image is transparent.
    luminance[i] = Math.round(((r * 299 + g * 587 + b * 114) / 1000) * a + 255 * (1 - a));
  }
  const bitmap = new BinaryBitmap(
    new HybridBinarizer(new RGBLuminanceSource(luminance, width, height)),
  );
  const hints = new Map<DecodeHintType, unknown>([
    [DecodeHintType.POSSIBLE_FORMATS, [format]],
    // ZXing's GS1 mode: a leading FNC1 in Code 128 becomes "]C1", later ones GS.
    [DecodeHintType.ASSUME_GS1, true],
  ]);
  // decode(image, hints): MultiFormatReader.decode replaces earlier hints with these.
  return new MultiFormatReader().decode(bitmap, hints).getText();
}

const fieldsOf = (scanned: string) => {
  const {
    elements: _e,
    symbology: _s,
    form: _f,
    ...fields
  } = parseElementString(scanned, { now: NOW });
  return fields;
};

describe('GS1-128 of a shipment SSCC', () => {
  it('renders a PNG that ZXing reads back as the same SSCC', async () => {
    // docs/references.md (derived): (00)106141411234567897.
    const sscc = buildSscc({
      extensionDigit: 1,
      companyPrefix: '0614141',
      serialReference: '123456789',
    });
    const png = await renderGs1128(`(00)${sscc}`, { now: NOW });
    expect(png.subarray(0, 8)).toEqual(
      Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    );

    const decoded = decodePng(png, BarcodeFormat.CODE_128);
    // ZXing reports the leading FNC1 as the GS1-128 symbology identifier.
    expect(decoded).toBe(`]C1${buildElementString({ sscc })}`);
    const parsed = parseElementString(decoded, { now: NOW });
    expect(parsed.symbology).toBe('gs1-128');
    expect(parsed.sscc).toBe('106141411234567897');
  });

  it('carries several fields with FNC1 between variable-length ones', async () => {
    const fields = { sscc: '106141411234567897', content: '09521234543213', count: 12, lot: 'L-7' };
    const decoded = decodePng(
      await renderGs1128(buildElementString(fields)),
      BarcodeFormat.CODE_128,
    );
    expect(decoded).toBe(`]C1${buildElementString(fields)}`);
    expect(decoded).toContain(GS);
    expect(fieldsOf(decoded)).toEqual(fields);
  });
});

describe('GS1 DataMatrix of the reference UDI strings', () => {
  it.each([
    // Barcode writer's wiki example (docs/references.md).
    ['(01)09521234543213(17)100101(10)123ABC(21)1234567890'],
    // The other published UDI example (docs/references.md).
    ['(01)51022222233336(11)141231(17)150707(10)A213B1(21)1234'],
  ])('%s survives render → ZXing → parse', async (hri) => {
    const png = await renderGs1DataMatrix(hri, { now: NOW });
    const decoded = decodePng(png, BarcodeFormat.DATA_MATRIX);
    // ZXing's Data Matrix decoder turns every FNC1, the leading one too, into GS.
    expect(decoded).toBe(`${GS}${buildElementString(fieldsOf(hri))}`);
    expect(fieldsOf(decoded)).toEqual(fieldsOf(hri));
  });
});

describe('what the renderers refuse', () => {
  it('checks the data first and throws our error, not the barcode writer’s', async () => {
    await expect(renderGs1128('(00)106141411234567890')).rejects.toBeInstanceOf(Gs1ParseError);
    await expect(renderGs1DataMatrix('(01)09521234543213(17)281301')).rejects.toMatchObject({
      code: 'bad_date',
    });
  });

  it('refuses a value with a bracketed number, which the bracketed form cannot carry', async () => {
    await expect(renderGs1DataMatrix(`0109521234543213${'10A(21)B'}`)).rejects.toThrow(RangeError);
  });
});
