import { describe, expect, it } from 'vitest';
import { ACTIVITY_LIBRARY, defaultMinTimebox, isBreakItem, newAgendaItem } from '../../shared/activities';
import { computeSchedule, toMinutes } from '../../shared/schedule';
import { DEFAULT_PEOPLE, instantiateTemplate, showPrompt, templateFill, TEMPLATES } from '../../shared/templates';
import { demoAgenda } from '../../server/db/demo-agenda';
import { ActivityType, AgendaItem } from '../../shared/schemas/agenda-item';
import { DayWindow, RuleSettings } from '../../shared/schemas/day-window';

const rules = RuleSettings.parse({});
const template = (id: 'full-day' | 'half-day') => TEMPLATES.find((t) => t.id === id)!;
const CORE = ['opening', 'empathize', 'define', 'ideate', 'prototype', 'test', 'closing'];

describe('activity library', () => {
  it('has an entry for every activity type, under its own type', () => {
    for (const type of ActivityType.options) expect(ACTIVITY_LIBRARY[type].type).toBe(type);
  });

  it('keeps the trade’s names and Cairn’s own', () => {
    expect(ACTIVITY_LIBRARY.empathy_map.label).toBe('Empathy map');
    expect(ACTIVITY_LIBRARY.how_might_we.label).toBe('How might we');
    expect(ACTIVITY_LIBRARY.dot_vote.label).toBe('Dot vote');
    expect(ACTIVITY_LIBRARY.preference_vote.label).toBe('Preference vote');
    expect(ACTIVITY_LIBRARY.team_sort.label).toBe('Team sort');
    expect(ACTIVITY_LIBRARY.test_rounds.label).toBe('Test rounds');
  });

  it('sets the shortest timebox at about two thirds of the default, breaks never cut', () => {
    for (const def of Object.values(ACTIVITY_LIBRARY)) {
      if (def.isBreak) expect(def.minTimeboxMin).toBe(def.defaultTimeboxMin);
      else expect(def.minTimeboxMin).toBe(Math.round((def.defaultTimeboxMin * 2) / 3));
      expect(def.minTimeboxMin).toBeLessThanOrEqual(def.defaultTimeboxMin);
    }
    expect(defaultMinTimebox(30)).toBe(20);
    expect(defaultMinTimebox(1)).toBe(1);
  });

  it('uses the trade’s rules of thumb as default settings', () => {
    // Common practice: paired interviews in two turns, so each partner asks once and answers once,
    // with time to listen and ask why; the turns fit the timebox.
    expect(ACTIVITY_LIBRARY.interview.defaultSettings).toMatchObject({ rounds: 2, roundMinutes: 10 });
    expect(ACTIVITY_LIBRARY.interview.defaultTimeboxMin).toBeGreaterThanOrEqual(2 * 10);
    // Common practice: quick sketches of about a minute each; the number is the item's setting.
    expect(ACTIVITY_LIBRARY.sketch.defaultSettings.sketchesPerPerson).toBe(6);
    expect(ACTIVITY_LIBRARY.sketch.defaultPrompt).toContain('{sketches}');
    // Common practice; published method cards: a storyboard runs 10–20 steps, 20–60 min.
    const frames = ACTIVITY_LIBRARY.storyboard.defaultSettings.storyboardFrames!;
    expect(frames).toBeGreaterThanOrEqual(10);
    expect(frames).toBeLessThanOrEqual(20);
    expect(ACTIVITY_LIBRARY.storyboard.defaultTimeboxMin).toBeGreaterThanOrEqual(20);
    expect(ACTIVITY_LIBRARY.storyboard.defaultTimeboxMin).toBeLessThanOrEqual(60);
    // Published guides (Global Learning Partners; Dotmocracy handbook): 3–5 dots per voter common.
    const dots = ACTIVITY_LIBRARY.dot_vote.defaultSettings.dotsPerVoter!;
    expect(dots).toBeGreaterThanOrEqual(3);
    expect(dots).toBeLessThanOrEqual(5);
    // University design thinking guides: at most 4 groups per room.
    expect(ACTIVITY_LIBRARY.team_sort.defaultSettings.teamCount).toBeLessThanOrEqual(4);
    expect(ACTIVITY_LIBRARY.test_rounds.defaultSettings.rounds).toBe(2);
  });

  it('marks talk, breaks and movement', () => {
    const talk = Object.values(ACTIVITY_LIBRARY).filter((d) => d.talkOnly).map((d) => d.type);
    expect(talk.sort()).toEqual(['talk', 'welcome']);
    const breaks = Object.values(ACTIVITY_LIBRARY).filter((d) => d.isBreak).map((d) => d.type);
    expect(breaks.sort()).toEqual(['break', 'lunch']);
    expect(ACTIVITY_LIBRARY.icebreaker.movement).toBe(true);
  });

  it('names the origin of every material quantity', () => {
    for (const def of Object.values(ACTIVITY_LIBRARY)) {
      for (const rule of def.materials) {
        expect(rule.source).toMatch(/common practice|published|d\.school/);
        // What the packing list shows: Cairn's own reason, never the origin.
        expect(rule.why).not.toMatch(/common practice|published|d\.school|handbook|method card/i);
        expect(rule.quantity).toBeGreaterThan(0);
      }
    }
  });

  it('makes a valid agenda item of every type', () => {
    for (const type of ActivityType.options) {
      const item = newAgendaItem(type, `id-${type}`);
      expect(AgendaItem.parse(item)).toEqual(item);
      expect(item.phase).toBe(ACTIVITY_LIBRARY[type].phase);
    }
    // The settings are a copy: changing one item leaves the library alone.
    newAgendaItem('dot_vote', 'x').settings.dotsPerVoter = 9;
    expect(ACTIVITY_LIBRARY.dot_vote.defaultSettings.dotsPerVoter).toBe(3);
  });
});

describe('templates', () => {
  for (const t of TEMPLATES) {
    it(`${t.name} gives no warnings with the default rules`, () => {
      const { items, window } = instantiateTemplate(t.id, counter());
      const s = computeSchedule(items, window, rules);
      expect(s.warnings).toEqual([]);
      expect(s.loadPct).toBeLessThanOrEqual(85);
    });

    it(`${t.name} is valid against the schemas and runs the phases in order`, () => {
      expect(DayWindow.parse(t.window)).toEqual(t.window);
      const { items } = instantiateTemplate(t.id, counter());
      for (const item of items) {
        AgendaItem.parse(item);
        expect(item.minTimeboxMin).toBeLessThanOrEqual(item.timeboxMin);
      }
      const phases = items.filter((i) => !isBreakItem(i)).map((i) => i.phase);
      const ranks = phases.map((p) => CORE.indexOf(p));
      expect(ranks).toEqual([...ranks].sort((a, b) => a - b));
      // Every phase of the day, from opening to closing.
      expect(new Set(phases)).toEqual(new Set(CORE));
    });
  }

  it('full day: all-day window and breaks of a full day', () => {
    const t = template('full-day');
    // Common practice: block 09:00–17:00, run 10:00–16:00.
    expect(t.window).toEqual({ doorsOpen: '09:00', doorsClose: '17:00', start: '10:00', end: '16:00' });
    const { items, window } = instantiateTemplate('full-day', counter());
    const s = computeSchedule(items, window, rules);
    expect(s.fullDay).toBe(true);
    const at = (i: number) => s.items[i]!.startMin;
    const lunchIndex = items.findIndex((i) => i.type === 'lunch');
    // Published workshop-planning guides: lunch ≥ 45 min, a 15 min morning break,
    // a couple of 15 min afternoon breaks.
    expect(items[lunchIndex]!.timeboxMin).toBeGreaterThanOrEqual(45);
    const breaks = items.map((item, i) => ({ item, i })).filter(({ item }) => item.type === 'break');
    const morning = breaks.filter(({ i }) => i < lunchIndex);
    const afternoon = breaks.filter(({ i }) => i > lunchIndex);
    expect(morning.map(({ item }) => item.timeboxMin)).toEqual([15]);
    expect(afternoon.map(({ item }) => item.timeboxMin)).toEqual([15, 15]);
    // Lunch around midday.
    expect(at(lunchIndex)).toBeGreaterThanOrEqual(toMinutes('11:30'));
    expect(at(lunchIndex)).toBeLessThanOrEqual(toMinutes('13:00'));
    // A full day runs every activity type of a design day once, the phases in order: opening, empathize,
    // define, ideate, prototype, test, closing.
    expect(items.filter((i) => !isBreakItem(i)).map((i) => i.type)).toEqual([
      'welcome',
      'icebreaker',
      'interview',
      'empathy_map',
      'insights',
      'point_of_view',
      'how_might_we',
      'dot_vote',
      'team_sort',
      'sketch',
      'storyboard',
      'test_rounds',
      'closing',
    ]);
  });

  it('half day: about four hours, inside its doors', () => {
    const t = template('half-day');
    // Common practice: a 4-hour workshop.
    expect(toMinutes(t.window.end) - toMinutes(t.window.start)).toBe(240);
    const s = computeSchedule(instantiateTemplate('half-day', counter()).items, t.window, rules);
    expect(s.fullDay).toBe(false);
  });

  it('speaks in neutral words: a workshop from each template names nothing of the demo', () => {
    // The demo scenario's own words (Harbour Lane Bike Co-op, a new member's first ride).
    const demoWords = /harbour|lane|co-?op|\bbikes?\b|\bcycl|\bride|\brides\b|\briding\b|\bmembers?\b|\bdocks?\b|priya/i;
    const fill = templateFill({ title: 'Borrowing a book for the first time', persona: 'Library visitors' });
    for (const t of TEMPLATES) {
      const { items } = instantiateTemplate(t.id, counter(), fill);
      for (const i of items) {
        expect(i.title, `${t.id}: ${i.title}`).not.toMatch(demoWords);
        expect(i.prompt, `${t.id}: ${i.prompt}`).not.toMatch(demoWords);
        expect(showPrompt(i)).not.toMatch(demoWords);
        expect(`${i.title} ${i.prompt}`).not.toMatch(/\{topic\}|\{people\}/);
        expect(i.prompt.length).toBeGreaterThan(0);
      }
      const text = items.map((i) => i.prompt).join(' ');
      expect(text).toContain('“Borrowing a book for the first time”');
      expect(text).toContain('for Library visitors so that');
      // A vote's prompt names neither a fixed number of dots nor a time of day: both can move.
      const vote = items.find((i) => i.type === 'dot_vote')!;
      expect(vote.prompt).not.toMatch(/\b(three|four|five)\b|morning|afternoon/i);
    }
  });

  it('fills the people from a short persona, and says so plainly for a long or empty one', () => {
    expect(templateFill({ title: ' Topic ', persona: 'First-time visitors. They come on Saturdays.' })).toEqual({
      topic: 'Topic',
      people: 'First-time visitors',
    });
    expect(templateFill({ title: 'T', persona: '' }).people).toBe(DEFAULT_PEOPLE);
    expect(templateFill({ title: 'T', persona: 'x'.repeat(61) }).people).toBe(DEFAULT_PEOPLE);
    expect(templateFill({ title: 'T' }).people).toBe(DEFAULT_PEOPLE);
  });

  it('names the dots of a vote from its budget whenever the prompt is shown', () => {
    const { items } = instantiateTemplate('full-day', counter());
    const vote = items.find((i) => i.type === 'dot_vote')!;
    expect(showPrompt(vote)).toMatch(/^Spend your 3 dots /);
    vote.settings.dotsPerVoter = 5;
    expect(showPrompt(vote)).toMatch(/^Spend your 5 dots /);
    // The vote as it ran (set up with 2 dots) wins over the plan's 5, as the phones showed it.
    expect(showPrompt(vote, 2)).toMatch(/^Spend your 2 dots /);
    vote.settings.dotsPerVoter = 1;
    expect(showPrompt(vote)).toMatch(/^Spend your 1 dot on /);
    // A prompt without a count of dots is shown as written, and other types are never touched.
    expect(showPrompt({ ...vote, prompt: 'Vote now' })).toBe('Vote now');
    expect(showPrompt({ ...vote, type: 'insights', prompt: 'Say {dots}' })).toBe('Say {dots}');
  });

  it('keeps the demo workshop in its own words, on the full day’s timing', () => {
    const demo = demoAgenda(counter());
    const { items } = instantiateTemplate('full-day', counter());
    expect(demo.items.map((i) => [i.type, i.timeboxMin])).toEqual(items.map((i) => [i.type, i.timeboxMin]));
    const text = demo.items.map((i) => i.prompt).join(' ');
    expect(text).toMatch(/Harbour Lane Bike Co-op/);
    expect(text).toMatch(/first ride/);
  });

  it("writes the demo's and the templates' dot-vote prompts with {dots}, never a number of dots (Cairn's own rule)", () => {
    const demo = demoAgenda(counter());
    const votes = [...demo.items, ...instantiateTemplate('full-day', counter()).items, ...instantiateTemplate('half-day', counter()).items].filter((i) => i.type === 'dot_vote');
    expect(votes.length).toBeGreaterThanOrEqual(3);
    for (const vote of votes) {
      expect(vote.prompt, vote.title).toContain('{dots}');
      // No count of dots written out ("3 dots", "three dots"): the screens take it from the vote's budget.
      expect(vote.prompt.replaceAll('{dots}', ''), vote.title).not.toMatch(/\b(\d+|one|two|three|four|five|six)\s+dots?\b/i);
      // The demo's vote as the phones show it with a budget of 2, and of 4.
      expect(showPrompt(vote, 2)).toMatch(/\b2 dots\b/);
      expect(showPrompt(vote, 4)).toMatch(/\b4 dots\b/);
      expect(showPrompt(vote, 4)).not.toMatch(/\b3 dots\b/);
    }
  });

  it('instantiates with fresh ids and a copy the caller may change', () => {
    const ids = ['a', 'b', 'c', 'd', 'e', 'f', 'g', 'h', 'i', 'j', 'k', 'l', 'm', 'n', 'o', 'p', 'q'];
    let n = 0;
    const { items, window } = instantiateTemplate('full-day', () => ids[n++]!);
    expect(items.map((i) => i.id)).toEqual(ids.slice(0, items.length));
    items[0]!.settings.dotsPerVoter = 7;
    items[0]!.title = 'Changed';
    window.start = '11:00';
    const again = instantiateTemplate('full-day', counter());
    expect(again.items[0]!.title).not.toBe('Changed');
    expect(again.items[0]!.settings.dotsPerVoter).toBeUndefined();
    expect(again.window.start).toBe('10:00');
  });

  it('refuses an unknown template', () => {
    expect(() => instantiateTemplate('weekend' as 'full-day', counter())).toThrow(RangeError);
  });
});

function counter(): () => string {
  let n = 0;
  return () => `item-${++n}`;
}
