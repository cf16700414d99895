import { describe, expect, it } from 'vitest';
import { countOf, fillDots } from '../../shared/words';

describe('countOf', () => {
  // English grammar: the singular for exactly one, the plural for zero and for more than one.
  it('uses the singular for one and the plural otherwise', () => {
    expect(countOf(1, 'option')).toBe('1 option');
    expect(countOf(0, 'option')).toBe('0 options');
    expect(countOf(6, 'option')).toBe('6 options');
    expect(countOf(2, 'person', 'people')).toBe('2 people');
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
