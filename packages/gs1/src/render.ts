/**
 * Barcode images for packing slips and labels: GS1-128 and GS1 DataMatrix as PNG, drawn by
 * bwip-js (pure JavaScript, no native code, no install script).
 *
 * Node only: bwip-js's Node build uses `zlib` for PNG. That is why this module is the separate
 * entry `@evalon/gs1/render` and not part of `@evalon/gs1`, which the browser imports for
 * parsing. `bwip-js/node` is imported by subpath because the package's root export has no
 * condition TypeScript's `bundler` resolution picks.
 * @packageDocumentation
 */
import bwipjs from 'bwip-js/node';

import { parseElementString, type ParseOptions } from './element-string';

/** Options for the barcode images. */
export interface RenderOptions extends ParseOptions {
  /**
   * Pixels per bwip-js unit: one GS1-128 module, half a Data Matrix module. Default 3 for
   * GS1-128, 4 for Data Matrix.
   */
  readonly scale?: number;
}

/**
 * A GS1-128 barcode (e.g. the SSCC of a shipment) as a PNG, with the bracketed text below it
 * and a quiet zone of 10 modules each side (ISO/IEC 15417's minimum, from memory). Symbol size
 * is not checked against GS1's symbol specification tables: that is the slip layout's job.
 * @param elementString The data in any form {@link parseElementString} reads; it is checked
 *   first, so an image is never made of data a scanner would refuse.
 * @throws Gs1ParseError when the data is not valid GS1 data; RangeError when a value holds a
 *   bracketed number the bracketed form cannot carry.
 */
export async function renderGs1128(
  elementString: string,
  options: RenderOptions = {},
): Promise<Buffer> {
  const text = canonicalHri(elementString, options);
  const scale = options.scale ?? 3;
  return bwipjs.toBuffer({
    bcid: 'gs1-128',
    text,
    scale,
    height: 15,
    includetext: true,
    textxalign: 'center',
    backgroundcolor: 'FFFFFF',
    // In bwip-js units, one per GS1-128 module (measured: the SSCC symbol is 156 units wide,
    // 11 per character + 13 for the stop), so 10 units = the 10-module quiet zone.
    paddingwidth: 10,
    paddingheight: 2,
  });
}

/**
 * A GS1 DataMatrix (e.g. a UDI: GTIN, expiry, lot, serial) as a PNG, with a quiet zone of two
 * modules (ISO/IEC 16022 asks for one; from memory). The bracketed text is printed beside it
 * by the slip, not drawn into the image.
 * @param elementString The data in any form {@link parseElementString} reads; checked first.
 * @throws Gs1ParseError when the data is not valid GS1 data.
 */
export async function renderGs1DataMatrix(
  elementString: string,
  options: RenderOptions = {},
): Promise<Buffer> {
  const text = canonicalHri(elementString, options);
  return bwipjs.toBuffer({
    bcid: 'gs1datamatrix',
    text,
    scale: options.scale ?? 4,
    backgroundcolor: 'FFFFFF',
    // bwip-js counts padding in its drawing units, two per Data Matrix module (measured: the
    // reference UDI gives a 22 × 22 symbol 44 units wide), so 4 units = 2 modules.
    padding: 4,
  });
}

/** Parses (so errors are ours, in plain English) and writes the bracketed form bwip-js takes. */
function canonicalHri(elementString: string, options: ParseOptions): string {
  const { elements } = parseElementString(elementString, options);
  const hri = elements.map(({ ai, value }) => `(${ai})${value}`).join('');
  // Same guard as buildElementString: a bracketed number inside a value would read as an AI.
  const ambiguous = elements.find(({ value }) => /\(\d{2,4}\)/.test(value));
  if (ambiguous) {
    throw new RangeError(
      `AI ${ambiguous.ai} value "${ambiguous.value}" contains a bracketed number, which the ` +
        'barcode writer would read as an AI.',
    );
  }
  return hri;
}
