import { beforeAll, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { installMessages } from '../../shared/schemas/messages';
import { WorkshopBrief } from '../../shared/schemas/workshop';
import { AgendaItemInput } from '../../shared/schemas/agenda-item';

// Cairn's writing rule (docs/glossary.md): a message says what is wrong and what to do, never a schema's words.
const messagesOf = (schema: z.ZodType, value: unknown) => {
  const r = schema.safeParse(value);
  return r.success ? {} : Object.fromEntries(r.error.issues.map((i) => [i.path.join('.'), i.message]));
};

describe('validation messages', () => {
  beforeAll(() => installMessages());

  const brief = {
    title: 'Harbour Lane first ride',
    objective: 'Make a new member’s first ride easy',
    persona: '',
    date: '2027-04-15',
    window: { doorsOpen: '09:00', doorsClose: '17:00', start: '10:00', end: '16:00' },
    venueNotes: '',
    headcount: 18,
    teamCount: 3,
    roomCapacity: 40,
    consentText: 'We keep your notes.',
    rules: { loadCeilingPct: 85, maxStretchMin: 90, minLunchMin: 45, maxTalkMin: 20, fullDayMin: 300 },
  };

  it('says the limits of teams, room capacity and the load ceiling with their nouns', () => {
    const m = messagesOf(WorkshopBrief, { ...brief, teamCount: 0, roomCapacity: -1, rules: { ...brief.rules, loadCeilingPct: 5 } });
    expect(m.teamCount).toBe('Enter at least 1 team');
    expect(m.roomCapacity).toBe('Enter a number that is not negative');
    expect(m['rules.loadCeilingPct']).toBe('Enter at least 10\u00a0%');
    expect(messagesOf(WorkshopBrief, { ...brief, teamCount: 13 }).teamCount).toBe('Enter at most 12 teams');
    expect(messagesOf(WorkshopBrief, { ...brief, teamCount: 2.5 }).teamCount).toBe('Enter a whole number');
  });

  it('keeps the messages a schema writes itself', () => {
    expect(messagesOf(WorkshopBrief, { ...brief, headcount: 1 }).headcount).toBe('A workshop needs at least 2 participants');
  });

  it('never speaks a schema’s words', () => {
    const m = messagesOf(AgendaItemInput, { type: 'dot_vote', phase: 'nowhere', title: '', timeboxMin: 0, prompt: 'x'.repeat(5000), settings: { dotsPerVoter: 0 }, extra: 1 });
    for (const text of Object.values(m)) {
      expect(text).not.toMatch(/expected|received|Too small|Too big|Invalid|>=|<=|Unrecognized/);
      expect(text).toMatch(/^[A-Z]/);
    }
    expect(Object.keys(m).length).toBeGreaterThan(2);
  });
});
