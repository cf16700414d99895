// No zod here: the facilitator's and the phone's error words (src/i18n/problems.ts) read these too.

/** What a number or list field counts, by its key, so a limit reads with its noun ("at least 1 team"). */
export const COUNTS: Readonly<Record<string, string>> = {
  teamCount: 'team',
  headcount: 'participant',
  roomCapacity: 'person',
  maxStretchMin: 'minute',
  minLunchMin: 'minute',
  maxTalkMin: 'minute',
  fullDayMin: 'minute',
  timeboxMin: 'minute',
  minTimeboxMin: 'minute',
  roundMinutes: 'minute',
  minutes: 'minute',
  rounds: 'round',
  dotsPerVoter: 'dot',
  capPerOption: 'dot',
  topN: 'option',
  options: 'option',
  criteria: 'criterion',
  sketchesPerPerson: 'sketch',
  storyboardFrames: 'frame',
  retentionDays: 'day',
  days: 'day',
  maxTeamSize: 'person',
  minTeamSize: 'person',
  sizes: 'team size',
};

/** Fields that are a percentage. */
export const PERCENTS: ReadonlySet<string> = new Set(['loadCeilingPct']);

