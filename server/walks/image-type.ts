/**
 * The type of an uploaded photo from its first bytes, never from the name or the type the client
 * claims: a text file renamed .jpg is refused. undefined for anything else.
 */
export interface ImageType {
  contentType: string;
  ext: string;
}

const HEIC_BRANDS: Record<string, ImageType> = {
  heic: { contentType: 'image/heic', ext: 'heic' },
  heix: { contentType: 'image/heic', ext: 'heic' },
  hevc: { contentType: 'image/heic', ext: 'heic' },
  mif1: { contentType: 'image/heif', ext: 'heif' },
  msf1: { contentType: 'image/heif', ext: 'heif' },
};

const ascii = (buf: Buffer, start: number, end: number) => buf.subarray(start, end).toString('latin1');

export function sniffImageType(buf: Buffer): ImageType | undefined {
  if (buf.length >= 3 && buf[0] === 0xff && buf[1] === 0xd8 && buf[2] === 0xff) return { contentType: 'image/jpeg', ext: 'jpg' };
  if (buf.length >= 8 && buf.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))) {
    return { contentType: 'image/png', ext: 'png' };
  }
  if (buf.length >= 12 && ascii(buf, 0, 4) === 'RIFF' && ascii(buf, 8, 12) === 'WEBP') return { contentType: 'image/webp', ext: 'webp' };
  // ISO base media file: a box size, then "ftyp" and the major brand.
  if (buf.length >= 12 && ascii(buf, 4, 8) === 'ftyp') return HEIC_BRANDS[ascii(buf, 8, 12)];
  return undefined;
}
