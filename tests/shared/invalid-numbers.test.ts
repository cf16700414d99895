import { describe, expect, it } from 'vitest';
import { defaultMinTimebox, newAgendaItem } from '../../shared/activities';
import { cautionsFor } from '../../shared/cautions';
import { cautionText } from './english';
import { bestSample, ClockSync, formatCountdown, ntpSample, remainingMs, serverNow } from '../../shared/clock';
import { computeDrift, cutRunTimeboxes, driftAnchor, suggestShortening, withRunTimeboxes } from '../../shared/drift';
import { packingList } from '../../shared/materials';
import { borda, pairwiseMatrix, schulze } from '../../shared/preference';
import { pairsForRound, roundRobin, roundRobinLength, testRotation } from '../../shared/rotations';
import { computeSchedule, shortestDayMin, toClock, toMinutes } from '../../shared/schedule';
import { RuleSettings } from '../../shared/schemas/day-window';
import { localDateOf, minutesOfDay, sessionName } from '../../shared/sessions';
import { checkBallot, competitionRanks, participation, selectTopN, suggestDotsPerVoter, tallyDots } from '../../shared/tally';
import { hungarian, sortIntoTeams, teamBounds, teamSizes } from '../../shared/team-sort';
import { suggestThemes } from '../../shared/themes';
import { countOf, fillDots, percentText } from '../../shared/words';

// Every export of shared/ that takes a number, fed numbers it cannot use: each either refuses them with a
// RangeError that names the value, or ignores them, as its JSDoc says. Cairn's own rule (issue 13): no
// NaN or Infinity flows silently into a count, a rank or a time. The expected values are worked by hand.

const NaN_ = Number.NaN;
const window = { doorsOpen: '09:00', doorsClose: '17:00', start: '10:00', end: '16:00' };
const rules = RuleSettings.parse({});
const agenda = () => [
  { ...newAgendaItem('welcome', 'w'), timeboxMin: 10 },
  { ...newAgendaItem('insights', 'i'), timeboxMin: 15 },
  { ...newAgendaItem('sketch', 's'), timeboxMin: 30 },
];

describe('the shared countdown (clock.ts)', () => {
  it('ignores a sample with a NaN delay instead of letting it win the least-delay choice', () => {
    const good = { offset: 5, delay: 12 };
    expect(bestSample([{ offset: 1, delay: NaN_ }, good])).toBe(good);
    expect(bestSample([good, { offset: 1, delay: NaN_ }])).toBe(good);
    expect(bestSample([{ offset: NaN_, delay: 1 }, { offset: 2, delay: -1 }])).toBeNull();
    const sync = new ClockSync();
    expect(sync.add({ offset: 1, delay: NaN_ })).toBe(false);
    expect(sync.addRoundTrip(0, NaN_, 61, 21)).toBeNull();
    expect(sync.samples).toEqual([]);
  });

  it('refuses times that are not finite numbers', () => {
    expect(() => ntpSample(0, NaN_, 61, 21)).toThrow('T2 must be a finite number, not NaN');
    expect(() => serverNow(Infinity, 0)).toThrow(RangeError);
    expect(() => remainingMs({ status: 'idle', endsAt: null, remainingMs: null, durationMs: 60_000 }, NaN_)).toThrow(RangeError);
  });

  it('treats garbled timer fields as missing, and reads a non-finite countdown as 00:00', () => {
    expect(remainingMs({ status: 'running', endsAt: NaN_, remainingMs: null, durationMs: 60_000 }, 0)).toBe(60_000);
    expect(remainingMs({ status: 'paused', endsAt: null, remainingMs: NaN_, durationMs: 30_000 }, 0)).toBe(30_000);
    expect(remainingMs({ status: 'idle', endsAt: null, remainingMs: null, durationMs: NaN_ }, 0)).toBe(0);
    expect(formatCountdown(NaN_)).toBe('00:00');
  });
});

describe('materials (materials.ts)', () => {
  it('refuses a NaN headcount instead of packing NaN stickers', () => {
    expect(() => packingList(agenda(), NaN_, 3)).toThrow('The headcount must be a whole number of 0 or more, not NaN');
    expect(() => packingList(agenda(), 18, -1)).toThrow('The number of teams');
    expect(() => packingList(agenda(), 2.5, 3)).toThrow(RangeError);
    expect(packingList(agenda(), 18, 3).every((l) => Number.isInteger(l.quantity))).toBe(true);
  });
});

describe('schedule (schedule.ts)', () => {
  it('refuses "25:99" and other times that are not times of day', () => {
    expect(() => toMinutes('25:99')).toThrow('Not a time of day: 25:99');
    expect(() => toMinutes('24:00')).toThrow(RangeError);
    expect(() => toMinutes('10:60')).toThrow(RangeError);
    expect(toMinutes('23:59')).toBe(1439);
    expect(() => toClock(NaN_)).toThrow(RangeError);
  });

  it('refuses a window that ends before it starts instead of reading "Infinity %"', () => {
    expect(() => computeSchedule(agenda(), { ...window, start: '16:00', end: '10:00' }, rules)).toThrow(
      'The workshop ends at 10:00, not after it starts at 16:00',
    );
    expect(() => computeSchedule(agenda(), { ...window, end: '10:00' }, rules)).toThrow(RangeError);
  });

  it('refuses a timebox that is not a number, and leaves a garbled minimum out of the shortest day', () => {
    const items = agenda();
    items[1]!.timeboxMin = NaN_;
    expect(() => computeSchedule(items, window, rules)).toThrow('The timebox of');
    const mins = agenda();
    const clean = shortestDayMin(mins);
    mins[2]!.minTimeboxMin = NaN_;
    expect(Number.isFinite(shortestDayMin(mins))).toBe(true);
    expect(shortestDayMin(mins)).toBeLessThanOrEqual(clean);
  });
});

describe('drift (drift.ts)', () => {
  const base = { items: agenda(), window, currentIndex: 1, currentStartedAtMin: 612, currentRemainingMin: 10, nowMin: 617 };
  it('refuses times that are not finite numbers', () => {
    expect(() => computeDrift({ ...base, nowMin: NaN_ })).toThrow('The time now must be a finite number');
    expect(() => computeDrift({ ...base, currentRemainingMin: Infinity })).toThrow(RangeError);
    expect(() => computeDrift({ ...base, anchorMin: NaN_ })).toThrow(RangeError);
    expect(() => suggestShortening(agenda(), 0, NaN_)).toThrow(RangeError);
    expect(() => driftAnchor({ workshopDate: '2027-03-13', windowStartMin: NaN_, startedDate: '2027-03-13', startedMin: 600 })).toThrow(RangeError);
  });

  it('ignores completed items, run timeboxes and cuts whose minutes are not numbers', () => {
    expect(computeDrift({ ...base, completed: [{ id: 'w', actualMin: NaN_ }] }).completedOverMin).toBe(0);
    expect(withRunTimeboxes(agenda(), { i: NaN_ })[1]!.timeboxMin).toBe(15);
    expect(cutRunTimeboxes({ timeboxes: {}, before: null }, agenda(), [{ itemId: 's', toMin: NaN_ }]).timeboxes).toEqual({});
  });
});

describe('cautions (cautions.ts)', () => {
  it('refuses a NaN headcount, and takes a NaN room capacity as unknown', () => {
    expect(() => cautionsFor(agenda(), { headcount: NaN_, hasPhotos: false })).toThrow('The headcount must be a whole number');
    const room = cautionsFor(agenda(), { headcount: 18, hasPhotos: false, roomCapacity: NaN_ }).map(cautionText).join(' ');
    expect(room).not.toMatch(/NaN/);
    expect(room).toContain('Check that the room holds 18 people');
  });
});

describe('sessions (sessions.ts)', () => {
  it('refuses a moment that is not a finite number instead of writing "NaN-NaN-NaN"', () => {
    expect(() => localDateOf(NaN_)).toThrow(RangeError);
    expect(() => minutesOfDay(Infinity)).toThrow(RangeError);
    expect(() => sessionName('day', NaN_)).toThrow(RangeError);
  });
});

describe('tallies (tally.ts)', () => {
  it('refuses the competition ranks of [3, NaN, 5] instead of ranking them 1, 2, 3', () => {
    expect(() => competitionRanks([3, NaN_, 5])).toThrow('Score 2 must be a finite number, not NaN');
    expect(competitionRanks([3, 5, 5])).toEqual([3, 1, 1]); // standard competition ranking ("1224")
  });

  it('refuses a change of dots that is not whole, and ignores held dots that are not', () => {
    const voteRules = { dotsPerVoter: 3, capPerOption: 3, allowStacking: true, criteria: [] };
    expect(checkBallot(voteRules, [], { optionId: 'a', criterionId: 'overall', delta: NaN_ })).toMatchObject({ ok: false, code: 'not_a_count' });
    const held = [{ voterId: 'v', optionId: 'a', criterionId: 'overall', count: NaN_ }];
    expect(checkBallot(voteRules, held, { optionId: 'a', criterionId: 'overall', delta: 1 })).toEqual({ ok: true });
  });

  it('leaves dots that are not whole out of tallies and participation; refuses a NaN N or budget', () => {
    const dots = [
      { voterId: 'v1', optionId: 'a', criterionId: 'overall', count: 2 },
      { voterId: 'v2', optionId: 'b', criterionId: 'overall', count: NaN_ },
    ];
    const tally = tallyDots(['a', 'b'], ['overall'], dots);
    expect(tally.overall.map((r) => [r.optionId, r.dots])).toEqual([
      ['a', 2],
      ['b', 0],
    ]);
    const voteRules = { dotsPerVoter: 3, capPerOption: 3, allowStacking: true, criteria: [] };
    expect(participation(['v1', 'v2'], dots, voteRules)).toEqual({ voters: 2, voted: 1, rate: 0.5, dotsLeft: 4 });
    expect(() => participation(['v1'], dots, { ...voteRules, dotsPerVoter: NaN_ })).toThrow(RangeError);
    expect(() => selectTopN(tally.overall, NaN_)).toThrow('N must be a whole number');
    expect(() => selectTopN([{ optionId: 'a', dots: 1, rank: NaN_, tied: false, nearTie: false }], 1)).toThrow(RangeError);
    expect(() => suggestDotsPerVoter(NaN_)).toThrow(RangeError);
  });
});

describe('preference votes (preference.ts)', () => {
  it('refuses a ballot weight that is not a finite number of 0 or more', () => {
    const ballots = [{ ranking: ['a', 'b'], weight: NaN_ }];
    expect(() => pairwiseMatrix(['a', 'b'], ballots)).toThrow('weight must be a finite number, not NaN');
    expect(() => borda(['a', 'b'], [{ ranking: ['a'], weight: -2 }])).toThrow(RangeError);
    expect(() => schulze(['a', 'b'], [{ ranking: ['a'], weight: Infinity }])).toThrow(RangeError);
  });
});

describe('rotations and team sort (rotations.ts, team-sort.ts)', () => {
  it('refuses counts and rounds that are not whole numbers', () => {
    expect(() => roundRobinLength(NaN_)).toThrow(RangeError);
    expect(() => roundRobin(2.5)).toThrow(RangeError);
    expect(() => pairsForRound(['a', 'b'], NaN_)).toThrow(RangeError);
    expect(() => testRotation([], NaN_)).toThrow(RangeError);
    expect(() => teamSizes(NaN_, 3)).toThrow(RangeError);
    expect(() => teamBounds(6, NaN_)).toThrow(RangeError);
    expect(() => hungarian([[1, NaN_]])).toThrow(RangeError);
    expect(() => sortIntoTeams([], ['x'], { maxTeamSize: NaN_ })).toThrow(RangeError);
  });
});

describe('words, activities and themes (words.ts, activities.ts, themes.ts)', () => {
  it('refuses or ignores numbers they cannot use', () => {
    expect(() => countOf(NaN_, 'dot')).toThrow(RangeError);
    expect(() => percentText(Infinity)).toThrow('A percentage must be a finite number, not Infinity');
    expect(() => percentText(50, NaN_)).toThrow(RangeError);
    expect(fillDots('Spend your three dots.', NaN_)).toBe('Spend your three dots.'); // ignored: the prompt stays
    expect(() => defaultMinTimebox(NaN_)).toThrow(RangeError);
    expect(() => suggestThemes([], { minSimilarity: NaN_ })).toThrow(RangeError);
  });
});
