import zlib from 'node:zlib';
import {
  BarcodeFormat,
  BinaryBitmap,
  DecodeHintType,
  HybridBinarizer,
  MultiFormatReader,
  RGBLuminanceSource,
} from '@zxing/library';

/** One image XObject of a PDF, as 8-bit luminance over white. */
export interface PdfImage {
  object: number;
  width: number;
  height: number;
  luminance: Uint8ClampedArray;
}

interface RawObject {
  dict: string;
  stream: Buffer | null;
}

/**
 * The image XObjects of a PDF, read from the file itself (ISO 32000-1 §7.3.8 streams, §8.9.5
 * image dictionaries, §11.6.5.3 soft masks): every indirect object's dictionary and stream are
 * cut out by their `/Length`, Flate streams are inflated, and an RGB or grey image with a
 * `/SMask` is composited over white. Enough for what pdfkit writes (8 bits per component, no
 * predictor on decoded images); anything else throws, so a change in the writer is noticed.
 */
export function pdfImages(pdf: Buffer): PdfImage[] {
  const text = pdf.toString('latin1');
  const objects = new Map<number, RawObject>();
  for (const m of text.matchAll(/(\d+) 0 obj\s*<</g)) {
    const start = m.index! + m[0].length - 2;
    let depth = 0;
    let end = start;
    for (let i = start; i < text.length - 1; i++) {
      if (text[i] === '<' && text[i + 1] === '<') {
        depth += 1;
        i += 1;
      } else if (text[i] === '>' && text[i + 1] === '>') {
        depth -= 1;
        i += 1;
        if (depth === 0) {
          end = i + 1;
          break;
        }
      }
    }
    const dict = text.slice(start, end);
    const after = /^\s*stream\r?\n/.exec(text.slice(end, end + 20));
    let stream: Buffer | null = null;
    if (after) {
      const length = /\/Length (\d+)/.exec(dict);
      if (!length) throw new Error(`object ${m[1]}: stream without a direct /Length`);
      const from = end + after[0].length;
      stream = pdf.subarray(from, from + Number(length[1]));
    }
    objects.set(Number(m[1]), { dict, stream });
  }
  const samples = (o: RawObject): Buffer => {
    if (!o.stream) throw new Error('image without a stream');
    if (/\/DecodeParms/.test(o.dict)) throw new Error('predictor-coded images are not read here');
    return /\/Filter \/FlateDecode/.test(o.dict) ? zlib.inflateSync(o.stream) : o.stream;
  };
  const num = (dict: string, key: string) => Number(new RegExp(`/${key} (\\d+)`).exec(dict)![1]);

  const images: PdfImage[] = [];
  const masks = new Set(
    [...objects.values()].flatMap((o) =>
      [...o.dict.matchAll(/\/SMask (\d+) 0 R/g)].map((x) => Number(x[1])),
    ),
  );
  for (const [object, o] of objects) {
    if (!/\/Subtype \/Image/.test(o.dict) || masks.has(object)) continue;
    const width = num(o.dict, 'Width');
    const height = num(o.dict, 'Height');
    if (num(o.dict, 'BitsPerComponent') !== 8) throw new Error('only 8-bit images are read here');
    const colours = /\/ColorSpace \/DeviceRGB/.test(o.dict)
      ? 3
      : /\/ColorSpace \/DeviceGray/.test(o.dict)
        ? 1
        : 0;
    if (!colours) throw new Error(`object ${object}: colour space not read here`);
    const data = samples(o);
    const maskRef = /\/SMask (\d+) 0 R/.exec(o.dict);
    const alpha = maskRef ? samples(objects.get(Number(maskRef[1]))!) : null;
    const luminance = new Uint8ClampedArray(width * height);
    for (let i = 0; i < width * height; i++) {
      // ITU-R BT.601 luma for RGB; composited over white where the mask says transparent.
      const y =
        colours === 3
          ? (data[3 * i]! * 299 + data[3 * i + 1]! * 587 + data[3 * i + 2]! * 114) / 1000
          : data[i]!;
      const a = alpha ? alpha[i]! / 255 : 1;
      luminance[i] = Math.round(y * a + 255 * (1 - a));
    }
    images.push({ object, width, height, luminance });
  }
  return images.sort((a, b) => a.object - b.object);
}

/**
 * What a general-purpose reader (ZXing's JavaScript port) reads in an image, in GS1 mode, or
 * null when it finds no symbol of that format.
 */
export function readBarcode(image: PdfImage, format: BarcodeFormat): string | null {
  const bitmap = new BinaryBitmap(
    new HybridBinarizer(new RGBLuminanceSource(image.luminance, image.width, image.height)),
  );
  const hints = new Map<DecodeHintType, unknown>([
    [DecodeHintType.POSSIBLE_FORMATS, [format]],
    [DecodeHintType.ASSUME_GS1, true],
  ]);
  try {
    return new MultiFormatReader().decode(bitmap, hints).getText();
  } catch {
    return null;
  }
}
