import { describe, expect, it } from 'vitest';
import { photoCleared, sniffImageType } from '../../server/features/activities/photos.service';
import {
  ACTIVITY_LIMITS,
  CLOSING_PARTS,
  EMPATHY_MAP_PARTS,
  FEEDBACK_GRID_PARTS,
  INTERVIEW_PARTS,
  composeGuided,
  guidedComplete,
  guidedFieldsSchema,
  guidedHints,
  notePartsFor,
} from '../../shared/schemas/activities';

describe('the parts notes are filed under', () => {
  it('interviews note what the partner says, thinks, does and feels', () => {
    // Published empathy-map canvases: says / thinks / does / feels.
    expect(notePartsFor('interview', {}).map((p) => p.id)).toEqual(['says', 'thinks', 'does', 'feels']);
    expect(INTERVIEW_PARTS).toHaveLength(4);
  });

  it('an empathy map has sees, hears, says & does, thinks & feels, and pains and gains only when set', () => {
    // Published empathy-map canvases, the variant with sees / hears and pains / gains.
    expect(notePartsFor('empathy_map', {}).map((p) => p.label)).toEqual(['Sees', 'Hears', 'Says & does', 'Thinks & feels']);
    expect(notePartsFor('empathy_map', { painsAndGains: true }).map((p) => p.id)).toEqual([
      ...EMPATHY_MAP_PARTS.map((p) => p.id),
      'pains',
      'gains',
    ]);
  });

  it('the feedback capture grid has four parts, and the closing a reflection and a next step', () => {
    // d.school method card: the feedback capture grid's four quadrants (likes, what to change, questions, ideas).
    expect(FEEDBACK_GRID_PARTS.map((p) => p.label)).toEqual(['What worked', "What didn't work", 'Questions', 'Ideas']);
    expect(notePartsFor('test_rounds', {})).toBe(FEEDBACK_GRID_PARTS);
    expect(notePartsFor('closing', {})).toBe(CLOSING_PARTS);
    expect(notePartsFor('insights', {})).toEqual([]);
  });
});

describe('guided sentences', () => {
  it('composes a point of view as user + need + insight', () => {
    // d.school: a point of view is [user] needs [need, a verb] because [insight].
    expect(composeGuided('point_of_view', { user: 'A new member', need: 'to find a free dock', insight: 'a full dock ends the ride badly.' })).toBe(
      'A new member needs to find a free dock because a full dock ends the ride badly',
    );
  });

  it('composes a how might we question with action, user and outcome', () => {
    // Published method cards: "How might we [action] for [user] so that [outcome]?"
    expect(composeGuided('how_might_we', { action: ' make docks  easy to find', user: 'a new member', outcome: 'the first ride ends well.' })).toBe(
      'How might we make docks easy to find for a new member so that the first ride ends well?',
    );
  });

  it('gives a gentle hint for an empty field, a long one, a need that is a thing, and a repeated "how might we"', () => {
    const pov = guidedHints('point_of_view', { user: '', need: 'a map of docks', insight: 'x'.repeat(ACTIVITY_LIMITS.fieldSoftChars + 1) });
    expect(pov.user).toMatch(/Who is this about/);
    expect(pov.need).toMatch(/as something to do/);
    expect(pov.insight).toMatch(/shorter/);
    expect(guidedHints('point_of_view', { user: 'A new member', need: 'to find a dock', insight: 'docks fill up by 9' })).toEqual({
      user: null,
      need: null,
      insight: null,
    });
    expect(guidedHints('how_might_we', { action: 'How might we make docks obvious', user: 'members', outcome: 'they ride' }).action).toMatch(/No need/);
    expect(guidedHints('how_might_we', { action: 'x'.repeat(ACTIVITY_LIMITS.fieldChars + 1), user: 'a', outcome: 'b' }).action).toMatch(/Too long/);
  });

  it('can be sent once every field is filled and within the limit; the server schema agrees', () => {
    const full = { action: 'make unlocking obvious', user: 'a new member', outcome: 'they ride off alone' };
    expect(guidedComplete('how_might_we', full)).toBe(true);
    expect(guidedComplete('how_might_we', { ...full, outcome: '  ' })).toBe(false);
    expect(guidedFieldsSchema('how_might_we').safeParse(full).success).toBe(true);
    expect(guidedFieldsSchema('how_might_we').safeParse({ ...full, outcome: '' }).success).toBe(false);
    expect(guidedFieldsSchema('how_might_we').safeParse({ ...full, extra: 'no' }).success).toBe(false);
  });
});

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
