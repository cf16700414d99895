import { describe, expect, it } from 'vitest';
import { copyTitle, insertionIndex, newAgendaItem } from '../../shared/activities';
import { computeSchedule } from '../../shared/schedule';
import { instantiateTemplate } from '../../shared/templates';
import { percentText } from '../../shared/words';
import { WorkshopBrief } from '../../shared/schemas/workshop';
import { RuleSettings } from '../../shared/schemas/day-window';
import type { ActivityType } from '../../shared/schemas/agenda-item';

const rules = RuleSettings.parse({});

describe('where a new activity goes', () => {
  const { items, window } = instantiateTemplate('full-day', (() => { let n = 0; return () => `t${++n}`; })());
  const types = items.map((i) => i.type);

  it('goes after the last activity of its phase, never after Closing (full-day template, counted by hand)', () => {
    // Template order: welcome, icebreaker | interview, empathy_map | break | insights, point_of_view |
    // how_might_we | lunch | dot_vote, team_sort | sketch | break | storyboard | break | test_rounds | closing.
    expect(insertionIndex(items, 'opening')).toBe(types.indexOf('icebreaker') + 1);
    expect(insertionIndex(items, 'empathize')).toBe(types.indexOf('empathy_map') + 1);
    expect(insertionIndex(items, 'test')).toBe(types.indexOf('closing'));
    expect(insertionIndex(items, 'closing')).toBe(items.length);
    expect(insertionIndex(items, 'break')).toBe(types.indexOf('closing'));
    expect(insertionIndex([], 'ideate')).toBe(0);
  });

  it('keeps the phase-order rule quiet for every type added to the template', () => {
    for (const type of ['welcome', 'interview', 'insights', 'how_might_we', 'dot_vote', 'sketch', 'storyboard', 'test_rounds', 'break', 'closing'] as ActivityType[]) {
      const item = newAgendaItem(type, `new-${type}`);
      const at = insertionIndex(items, item.phase);
      const next = [...items.slice(0, at), item, ...items.slice(at)];
      const codes = computeSchedule(next, window, rules).warnings.map((w) => w.code);
      expect(codes, type).not.toContain('phases_out_of_order');
    }
  });
});

describe('the title of a copy', () => {
  it('tells the copy from the original and from earlier copies', () => {
    expect(copyTitle('Sketch', ['Sketch'])).toBe('Sketch (copy)');
    expect(copyTitle('Sketch', ['Sketch', 'Sketch (copy)'])).toBe('Sketch (copy 2)');
    expect(copyTitle('Sketch (copy)', ['Sketch', 'Sketch (copy)'])).toBe('Sketch (copy 2)');
    // Stays within the 120-character title limit of the schema.
    const long = 'x'.repeat(120);
    expect(copyTitle(long, [long])).toHaveLength(120);
    expect(copyTitle(long, [long]).endsWith(' (copy)')).toBe(true);
  });
});

describe('percentages', () => {
  it('keep the number and the sign together with a no-break space (U+00A0)', () => {
    expect(percentText(85)).toBe('85\u00a0%');
    expect(percentText(83.333, 1)).toBe('83.3\u00a0%');
    expect(percentText(83.333)).not.toMatch(/ %/);
  });
});

describe('headcount messages', () => {
  const base = {
    title: 'Borrowing a book', objective: 'Learn', persona: '', date: '2027-03-14',
    window: { doorsOpen: '09:00', doorsClose: '17:00', start: '10:00', end: '16:00' },
    venueNotes: '', teamCount: 3, roomCapacity: null, consentText: 'x', rules,
  };
  const message = (headcount: unknown) =>
    WorkshopBrief.safeParse({ ...base, headcount }).error?.issues.find((i) => i.path[0] === 'headcount')?.message;

  it('say what is wrong with what was typed', () => {
    expect(message(2.5)).toBe('Enter a whole number');
    expect(message(undefined)).toBe('The headcount is required');
    expect(message('')).toBe('The headcount is required');
    expect(message(1)).toBe('A workshop needs at least 2 participants');
    expect(message(18)).toBeUndefined();
  });
});
