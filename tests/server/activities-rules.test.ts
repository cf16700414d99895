import { describe, expect, it } from 'vitest';
import { photoCleared, sniffImageType } from '../../server/features/activities/photos.service';

describe('photo files by their signature', () => {
  it('knows PNG, JPEG and WebP by their first bytes, whatever the name says', () => {
    // PNG specification §5.2: the signature 89 50 4E 47 0D 0A 1A 0A.
    expect(sniffImageType(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0]))).toBe('png');
    // ITU-T T.81 (JPEG): start of image FF D8, then the next marker's FF.
    expect(sniffImageType(Buffer.from([0xff, 0xd8, 0xff, 0xe1, 0, 0]))).toBe('jpeg');
    // RFC 9649 §2: "RIFF", a 32-bit size, then "WEBP".
    expect(sniffImageType(Buffer.from('RIFF\x24\x00\x00\x00WEBPVP8 ', 'latin1'))).toBe('webp');
  });

  it('refuses GIF, PDF, HTML and a truncated signature', () => {
    // GIF89a (GIF specification, 1989), %PDF- (ISO 32000-1 §7.5.2).
    expect(sniffImageType(Buffer.from('GIF89a\x01\x00\x01\x00', 'latin1'))).toBeNull();
    expect(sniffImageType(Buffer.from('%PDF-1.7\n', 'latin1'))).toBeNull();
    expect(sniffImageType(Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"/>'))).toBeNull();
    expect(sniffImageType(Buffer.from([0x89, 0x50, 0x4e, 0x47]))).toBeNull();
    expect(sniffImageType(Buffer.from('RIFF\x24\x00\x00\x00WAVEfmt ', 'latin1'))).toBeNull();
  });
});

describe('when a photo may be shown as it is', () => {
  it('a photo of no one always; a photo of people only with everyone’s consent on record', () => {
    // Cairn's consent rule: photos showing people only for consenting participants.
    expect(photoCleared({ showsPeople: false, peopleConsent: false }, false)).toBe(true);
    expect(photoCleared({ showsPeople: true, peopleConsent: true }, true)).toBe(true);
    expect(photoCleared({ showsPeople: true, peopleConsent: true }, false)).toBe(false);
    expect(photoCleared({ showsPeople: true, peopleConsent: false }, true)).toBe(false);
  });
});
