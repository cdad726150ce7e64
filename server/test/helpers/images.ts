import zlib from 'node:zlib';

/**
 * Tiny real images made in code, so the photo tests need no binary fixtures. Both follow the
 * published formats closely enough for any decoder: PNG per ISO/IEC 15948 (signature, IHDR,
 * zlib-compressed IDAT with filter byte 0 per row, IEND, CRC-32 per chunk); JPEG as a baseline
 * JFIF (ITU-T T.81) of one 8×8 block whose every coefficient is zero, i.e. a flat mid-grey.
 */

function chunk(type: string, data: Buffer): Buffer {
  const length = Buffer.alloc(4);
  length.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(zlib.crc32(body));
  return Buffer.concat([length, body, crc]);
}

/** An RGB PNG of `width` × `height` pixels of one colour. */
export function tinyPng(
  width = 2,
  height = 2,
  rgb: [number, number, number] = [15, 82, 87],
): Buffer {
  const header = Buffer.alloc(13);
  header.writeUInt32BE(width, 0);
  header.writeUInt32BE(height, 4);
  header[8] = 8; // bit depth
  header[9] = 2; // colour type RGB
  header[10] = 0; // deflate
  header[11] = 0; // adaptive filtering
  header[12] = 0; // no interlace
  const row = Buffer.concat([Buffer.from([0]), Buffer.from(Array(width).fill(rgb).flat())]);
  const raw = Buffer.concat(Array(height).fill(row));
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', header),
    chunk('IDAT', zlib.deflateSync(raw)),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

function segment(marker: number, data: number[]): number[] {
  const length = data.length + 2;
  return [0xff, marker, length >> 8, length & 0xff, ...data];
}

/**
 * An 8×8 grey baseline JPEG. One component; the DC and AC Huffman tables each hold a single
 * one-bit code for symbol 0 (DC difference category 0, AC end-of-block), so the scan is the two
 * bits `00` padded with ones: 0x3F.
 */
export function tinyJpeg(): Buffer {
  const bytes = [
    0xff,
    0xd8, // SOI
    ...segment(0xe0, [0x4a, 0x46, 0x49, 0x46, 0x00, 1, 1, 0, 0, 1, 0, 1, 0, 0]), // APP0 JFIF 1.1
    ...segment(0xdb, [0x00, ...Array(64).fill(1)]), // DQT: table 0, all ones
    ...segment(0xc0, [8, 0, 8, 0, 8, 1, 1, 0x11, 0]), // SOF0: 8-bit, 8×8, 1 component
    ...segment(0xc4, [0x00, 1, ...Array(15).fill(0), 0x00]), // DHT DC 0: one code, symbol 0
    ...segment(0xc4, [0x10, 1, ...Array(15).fill(0), 0x00]), // DHT AC 0: one code, EOB
    ...segment(0xda, [1, 1, 0x00, 0, 63, 0]), // SOS: component 1 uses tables 0/0
    0x3f, // entropy-coded data
    0xff,
    0xd9, // EOI
  ];
  return Buffer.from(bytes);
}
