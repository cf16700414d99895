import { describe, expect, it } from 'vitest';
import { ACTIVITY_LIMITS } from '../../shared/notes';
import { composeGuided, guidedComplete, guidedHints } from '../../shared/guided';
import { guidedFieldsSchema } from '../../shared/schemas/activities';

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
