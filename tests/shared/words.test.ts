import { describe, expect, it } from 'vitest';
import { countOf, dateTimeText, dayText, fillDots, fillSketches, pluralOf } from '../../shared/words';

describe('countOf', () => {
  // English grammar: the singular for exactly one, the plural for zero and for more than one.
  it('uses the singular for one and the plural otherwise', () => {
    expect(countOf(1, 'option')).toBe('1 option');
    expect(countOf(0, 'option')).toBe('0 options');
    expect(countOf(6, 'option')).toBe('6 options');
    expect(countOf(2, 'person', 'people')).toBe('2 people');
  });

  // English grammar: "person" → "people", "-es" after s, x, z, ch, sh; "-ies" after a consonant and y.
  it('makes the plurals Cairn counts, the singular from the CLDR rule "one"', () => {
    expect(countOf(1, 'person')).toBe('1 person');
    expect(countOf(3, 'person')).toBe('3 people');
    expect(countOf(5, 'sketch')).toBe('5 sketches');
    expect(countOf(1, 'board')).toBe('1 board');
    expect(countOf(1, 'set')).toBe('1 set');
    expect(countOf(2, 'criterion')).toBe('2 criteria');
    expect(countOf(1.5, 'dot')).toBe('1.5 dots');
    expect(pluralOf('copy')).toBe('copies');
    expect(pluralOf('day')).toBe('days');
    expect(pluralOf('box')).toBe('boxes');
  });
});

describe('fillSketches', () => {
  it('fills the number of sketches from the setting, the noun agreeing', () => {
    expect(fillSketches('Draw {sketches} rough sketches.', 5)).toBe('Draw 5 rough sketches.');
    expect(fillSketches('Draw {sketches} sketches.', 1)).toBe('Draw 1 sketch.');
    expect(fillSketches('Sketches each: {sketches}.', 4)).toBe('Sketches each: 4.');
    expect(fillSketches('Draw {sketches} sketches.', undefined)).toBe('Draw {sketches} sketches.');
  });
});

describe('dayText and dateTimeText', () => {
  // Unicode CLDR date formats as the runtime's Intl ships them ("long" date style), from memory of the
  // usual English forms: British day-month, American month-day.
  it('writes a date the reader’s way, the same day in every time zone', () => {
    expect(dayText('2027-04-15', 'en-GB')).toBe('15 April 2027');
    expect(dayText('2027-04-15', 'en-US')).toBe('April 15, 2027');
    expect(dayText('', 'en-GB')).toBe('');
  });
  it('writes times on a 24-hour clock', () => {
    expect(dateTimeText(Date.UTC(2026, 11, 16, 15, 5), 'en-US', 'UTC')).toBe('December 16, 2026 at 15:05');
  });
});

describe('fillDots', () => {
  it('takes the number of dots a prompt names from the budget', () => {
    expect(fillDots('Spend your three dots on the questions you most want to work on.', 4)).toBe(
      'Spend your 4 dots on the questions you most want to work on.',
    );
    expect(fillDots('Spend your 3 dots here.', 5)).toBe('Spend your 5 dots here.');
    expect(fillDots('Three dots each.', 1)).toBe('1 dot each.');
  });

  it('fills the {dots} placeholder with the number, the noun agreeing', () => {
    expect(fillDots('Spend your {dots} dots on the ideas.', 2)).toBe('Spend your 2 dots on the ideas.');
    expect(fillDots('Spend your {dots} dots on the ideas.', 1)).toBe('Spend your 1 dot on the ideas.');
    expect(fillDots('Dots each: {dots}.', 4)).toBe('Dots each: 4.');
  });

  it('leaves "a dot" and prompts without dots alone', () => {
    expect(fillDots('Put a dot on the idea you like best.', 4)).toBe('Put a dot on the idea you like best.');
    expect(fillDots('Rank the options.', 4)).toBe('Rank the options.');
  });

  it('without a budget, keeps the prompt as it is', () => {
    expect(fillDots('Spend your three dots.', undefined)).toBe('Spend your three dots.');
  });
});
