import type { AppContext } from '../../context';
import type { LiveSessionRow, ParticipantRow, PhotoRow, SubmissionRow, TeamRow, WorkshopRow } from '../../db/models';
import { errors } from '../../common/errors';
import { toAgendaItem } from '../workshops/workshops.service';
import { photoCleared } from '../activities/photos.service';
import { computeSchedule } from '../../../shared/schedule';
import { selectSessions, sessionName, type SessionSelector } from '../../../shared/sessions';
import { competitionRanks, OVERALL_CRITERION } from '../../../shared/tally';
import { MATRIX_RANKING, quadrantName, rankingName, rankingOf } from '../../../shared/matrix';
import { tieLine } from '../../../shared/tally';
import { madeName } from '../../../shared/made-names';
import type { AgendaItem } from '../../../shared/schemas/agenda-item';
import { FEEDBACK_GRID_PARTS } from '../../../shared/schemas/activities';
import type { VoteResults } from '../../../shared/schemas/voting';
import { METHOD_LABELS } from '../../../shared/preference';
import { showPrompt } from '../../../shared/templates';
import { ACTIVITY_LIBRARY, isVoteType, storyKey } from '../../../shared/activities';
import type {
  ActivityResult,
  AgendaRunRow,
  NoteGroup,
  NoteResult,
  ParticipantResult,
  Participation,
  ResultSection,
  TeamResult,
  VoteRecord,
  VoteRow,
  WorkshopResults,
} from '../../../shared/schemas/results';

/** Where the results read what other features compute: the vote results come from the voting service. */
export interface ResultsSources {
  /** Results of every closed vote of a workshop (server/features/voting). */
  votes?: { sessionResults(sessionId: string, title: Map<string, string>): Promise<VoteResults[]> };
}

/** The name a participant gets once names are removed (shared/made-names.ts: stored in English, worded on each screen). */
export function anonymousName(number: number): string {
  return madeName('participant', number);
}

/** Everything the providers build the results from, read once per request. */
export interface ResultsInput {
  ctx: AppContext;
  sources: ResultsSources;
  workshop: WorkshopRow;
  ownerName: string;
  agenda: AgendaItem[];
  /** The live sessions the results cover, oldest first (one session inside a provider). */
  sessions: LiveSessionRow[];
  /** Every live session of the workshop, oldest first, covered or not. */
  allSessions: LiveSessionRow[];
  /** What was asked for: the day's sessions, all, or the ones named. */
  selector: SessionSelector;
  /** Session id → its name in the results ("The day · 2026-05-14 09:58"). */
  sessionNames: Map<string, string>;
  /** Everyone who joined any of the sessions, in order of joining. */
  participants: ParticipantRow[];
  /** Participant id → 1-based number in order of joining. */
  numbers: Map<string, number>;
  /** Participant id → the name the results show (display name, or "Participant N" when anonymized). */
  names: Map<string, string>;
  teams: TeamRow[];
  teamNames: Map<string, string>;
  /** Every submission the facilitators did not hide, oldest first. */
  notes: NoteResult[];
  /** Theme ids in the order the facilitators placed the themes. */
  themeOrder: string[];
  anonymized: boolean;
  now: number;
  /** Loads something once per results build, for providers that share a read. */
  memo<T>(key: string, load: () => Promise<T>): Promise<T>;
}

/**
 * A provider of one kind of section of an activity's results: it returns the sections it has for
 * the item (none when the item has nothing of its kind). New kinds (votes, photos …) are added to
 * {@link ACTIVITY_PROVIDERS}.
 */
export type ActivityProvider = (item: AgendaItem, input: ResultsInput) => Promise<ResultSection[]> | ResultSection[];

/** A provider of raw vote records for the votes export. */
export type VoteRecordProvider = (input: ResultsInput) => Promise<VoteRecord[]> | VoteRecord[];

/** Submission kinds that are notes of the notes section (the others have sections of their own). */
const NOTE_KINDS = new Set(['note', 'point_of_view', 'how_might_we']);

/** Groups notes by a key, in the order the keys are given, then any other keys in order of first note. */
function groupNotes(
  notes: NoteResult[],
  keyOf: (n: NoteResult) => string | null,
  labelOf: (key: string | null) => string,
  order: (string | null)[],
): NoteGroup[] {
  const groups = new Map<string | null, NoteResult[]>();
  for (const key of order) groups.set(key, []);
  for (const n of notes) {
    const key = keyOf(n);
    if (!groups.has(key)) groups.set(key, []);
    groups.get(key)!.push(n);
  }
  return [...groups.entries()]
    .filter(([, list]) => list.length > 0)
    .map(([key, list]) => ({ key: key ?? 'none', label: labelOf(key), notes: list }));
}

/** Notes of an activity, by theme (when the facilitator grouped any) and by team. */
export const notesProvider: ActivityProvider = (item, input) => {
  const notes = input.notes.filter((n) => n.itemId === item.id && NOTE_KINDS.has(n.kind));
  if (notes.length === 0) return [];
  const themed = notes.some((n) => n.themeId !== null);
  const themeOrder = [...input.themeOrder, null];
  return [
    {
      kind: 'notes',
      total: notes.length,
      byTheme: themed
        ? groupNotes(notes, (n) => n.themeId, (key) => (key === null ? 'Not in a theme' : (notes.find((n) => n.themeId === key)?.themeName ?? 'Theme')), themeOrder)
        : [],
      // Without teams in this activity the notes are one group with no heading, not a "No team" group.
      byTeam: notes.some((n) => n.teamId !== null)
        ? groupNotes(notes, (n) => n.teamId, (key) => (key === null ? 'No team' : (input.teamNames.get(key) ?? 'Team')), [...input.teams.map((t) => t.id), null])
        : [{ key: 'all', label: '', notes }],
    },
  ];
};

/** The team a feedback note is about: the host team whose prototype was tested, as the phone chose it. */
function testedTeamOf(n: NoteResult): string | null {
  return n.fields?.hostTeamId ?? null;
}

/** Feedback capture grids of test rounds: one per team tested, four parts each. */
export const feedbackProvider: ActivityProvider = (item, input) => {
  // Feedback on a sketch belongs to the sketch (the photos section shows it), not to a grid.
  const notes = input.notes.filter((n) => n.itemId === item.id && n.kind === 'feedback' && !n.fields?.sketchId);
  if (notes.length === 0) return [];
  const teamIds = [...input.teams.map((t) => t.id as string | null), null].filter((id) => notes.some((n) => testedTeamOf(n) === id));
  for (const n of notes) if (!teamIds.includes(testedTeamOf(n))) teamIds.push(testedTeamOf(n));
  const known = new Set(FEEDBACK_GRID_PARTS.map((p) => p.id));
  return [
    {
      kind: 'feedback',
      grids: teamIds.map((teamId) => {
        const mine = notes.filter((n) => testedTeamOf(n) === teamId);
        const parts = FEEDBACK_GRID_PARTS.map(({ id, label }) => ({ part: id, label, notes: mine.filter((n) => n.part === id) }));
        const other = mine.filter((n) => !known.has(n.part ?? ''));
        if (other.length) parts.push({ part: 'other', label: 'Other feedback', notes: other });
        return { teamId, teamName: teamId === null ? 'No team' : (input.teamNames.get(teamId) ?? 'Team'), parts };
      }),
    },
  ];
};

/** The workshop's photos, each with whether it may be shown (consent honoured), read once per build. */
function photosOf(input: ResultsInput): Promise<{ row: PhotoRow; shown: boolean }[]> {
  return input.memo('photos', async () => {
    const rows = await input.ctx.db.models.Photo.findAll({ where: { sessionId: input.sessions.map((s) => s.id) }, order: [['createdAt', 'ASC']] });
    const consent = new Map(input.participants.map((p) => [p.id, p.photoConsent]));
    return rows.map((row) => ({ row, shown: photoCleared(row, consent.get(row.participantId) ?? false) }));
  });
}

/** The API path of a photo's thumbnail, for a signed-in reader of the workshop. */
function photoUrl(workshopId: string, photoId: string): string {
  return `/api/workshops/${encodeURIComponent(workshopId)}/photos/${encodeURIComponent(photoId)}?size=thumb`;
}

/** Storyboards: each team's frames (text or photo) in the order the team set, photos only where consent allows. */
export const storyboardProvider: ActivityProvider = async (item, input) => {
  const frames = input.notes.filter((n) => n.itemId === item.id && n.kind === 'frame');
  if (frames.length === 0) return [];
  const [states, photos] = await Promise.all([
    input.memo('activityStates', () => input.ctx.db.models.ActivityState.findAll({ where: { sessionId: input.sessions.map((s) => s.id) } })),
    photosOf(input),
  ]);
  const shown = new Set(photos.filter((p) => p.shown).map((p) => p.row.id));
  const orders: Record<string, string[]> = Object.assign({}, ...states.filter((st) => st.itemId === item.id).map((st) => st.frameOrders));
  const keys = [...new Set(frames.map(storyKey))];
  return [
    {
      kind: 'storyboards',
      boards: keys.map((key) => {
        const mine = frames.filter((f) => storyKey(f) === key);
        const order = orders[key] ?? [];
        const at = (id: string) => (order.includes(id) ? order.indexOf(id) : order.length);
        mine.sort((a, b) => at(a.id) - at(b.id) || a.createdAt - b.createdAt);
        const teamId = mine[0]!.teamId;
        return {
          teamId,
          teamName: teamId === null ? `${mine[0]!.author}'s storyboard` : (input.teamNames.get(teamId) ?? 'Team'),
          frames: mine.map((f, i) => {
            const photoId = f.fields?.photoId ?? null;
            return { position: i + 1, text: f.text, photoId: photoId && shown.has(photoId) ? photoId : null };
          }),
        };
      }),
    },
  ];
};

/** Photos of sketches: each with its caption, team, author and the feedback it got; pictures only where consent allows. */
export const sketchPhotosProvider: ActivityProvider = async (item, input) => {
  if (ACTIVITY_LIBRARY[item.type].photos !== 'sketch') return [];
  const sketches = input.notes.filter((n) => n.itemId === item.id && n.kind === 'sketch' && n.fields?.photoId);
  if (sketches.length === 0) return [];
  const photos = new Map((await photosOf(input)).map((p) => [p.row.id, p]));
  const entries = sketches.flatMap((n) => {
    const photo = photos.get(n.fields!.photoId!);
    if (!photo) return [];
    return [
      {
        id: photo.row.id,
        caption: n.text,
        teamName: n.teamName,
        author: n.author,
        shown: photo.shown,
        url: photo.shown ? photoUrl(input.workshop.id, photo.row.id) : null,
        feedback: input.notes.filter((f) => f.kind === 'feedback' && f.fields?.sketchId === n.id),
      },
    ];
  });
  return entries.length ? [{ kind: 'photos', photos: entries, withheld: entries.filter((e) => !e.shown).length }] : [];
};

/** A vote's option rows: labels from its options, selected where carried forward. */
function voteRows(
  v: VoteResults,
  rows: { optionId: string; score: number; rank: number; tied?: boolean; nearTie?: boolean }[],
  selected: Set<string>,
): VoteRow[] {
  const label = new Map(v.options.map((o) => [o.id, o.text]));
  return rows.map((r) => ({
    optionId: r.optionId,
    label: label.get(r.optionId) ?? '',
    score: r.score,
    rank: r.rank,
    // Ties are read off the ranks where the method does not flag them ("1224": equal ranks are a tie);
    // options that got nothing are no tie.
    tied: r.tied ?? (r.score > 0 && rows.some((o) => o !== r && o.rank === r.rank)),
    nearTie: r.nearTie ?? false,
    selected: selected.has(r.optionId),
  }));
}

/** A vote's results as a results section: the ranking that carries options forward, the others, ties, matrix and pairwise table. */
export function voteSection(v: VoteResults): Extract<ResultSection, { kind: 'votes' }> {
  const label = new Map(v.options.map((o) => [o.id, o.text]));
  const base = { open: v.status !== 'closed', voters: v.participation.voters, voted: v.participation.voted, pairwise: null, matrix: null };
  if (v.kind === 'dot_vote') {
    const selected = new Set(v.chosen ?? v.top.selected);
    // "Carried forward" marks the options in the ranking they were carried forward from, not in the other tables.
    const dots = (rows: { optionId: string; dots: number; rank: number; tied: boolean; nearTie: boolean }[], chosenHere = new Set<string>()) =>
      voteRows(v, rows.map((r) => ({ ...r, score: r.dots })), chosenHere);
    const criteria = v.rules.criteria;
    const byMatrix = v.rules.rankBy === MATRIX_RANKING && v.matrix !== null;
    const byCriterion = !byMatrix && v.rules.rankBy !== OVERALL_CRITERION;
    const name = rankingName(v.rules);
    const rankedBy = name.charAt(0).toUpperCase() + name.slice(1);
    const tables = [
      // All criteria together beside a ranking by one criterion; beside the matrix the sum would add effort to impact, so it is left out.
      ...(byCriterion ? [{ id: OVERALL_CRITERION, label: 'All criteria together', rows: dots(v.overall) }] : []),
      ...(criteria.length > 1 || byCriterion
        ? criteria.filter((c) => c.id !== v.rules.rankBy).map((c) => ({ id: c.id, label: c.label, rows: dots(v.perCriterion[c.id] ?? []) }))
        : []),
    ];
    const xLabel = criteria.find((c) => c.id === v.matrix?.xCriterionId)?.label ?? '';
    const yLabel = criteria.find((c) => c.id === v.matrix?.yCriterionId)?.label ?? '';
    const quadrant = new Map((v.matrix?.points ?? []).map((p) => [p.optionId, quadrantName(yLabel, p.yLevel, xLabel, p.xLevel)]));
    const levels = new Map((v.matrix?.points ?? []).map((p) => [p.optionId, { y: p.yLevel, x: p.xLevel }]));
    const main = dots(v.ranked, selected).map((row) =>
      byMatrix ? { ...row, quadrant: quadrant.get(row.optionId) ?? null, levels: levels.get(row.optionId) ?? null } : row,
    );
    return {
      kind: 'votes',
      method: 'dots',
      rankedBy,
      ranking: rankingOf(v.rules),
      // The matrix ranks by quadrant, then by the first criterion's dots: its score column counts those.
      scoreLabel: byMatrix ? `${yLabel} dots` : null,
      scoreCriterion: byMatrix ? yLabel : null,
      overall: main,
      tables,
      topN: v.rules.topN,
      tiePolicy: v.top.policy,
      tie: tieLine(v.top, Math.min(v.rules.topN, v.options.length)),
      tiedAtCutoff: v.top.tiedAtCutoff.map((id) => label.get(id) ?? ''),
      unvotedAtCutoff: v.top.unvotedAtCutoff,
      ...base,
      matrix: v.matrix
        ? {
            xLabel,
            yLabel,
            xMeans: criteria.find((c) => c.id === v.matrix?.xCriterionId)?.dotMeans ?? 'high',
            yMeans: criteria.find((c) => c.id === v.matrix?.yCriterionId)?.dotMeans ?? 'high',
            points: v.matrix.points.map((p) => ({
              optionId: p.optionId,
              x: p.x,
              y: p.y,
              label: label.get(p.optionId) ?? '',
              quadrant: quadrant.get(p.optionId) ?? '',
              levels: { y: p.yLevel, x: p.xLevel },
            })),
          }
        : null,
    };
  }
  if (v.kind === 'preference_vote') {
    const selected = new Set(v.chosen ?? v.top.selected);
    const mark = (method: string) => (v.rules.method === method ? selected : new Set<string>());
    const borda = { id: 'borda', label: METHOD_LABELS.borda, rows: voteRows(v, v.borda.map((r) => ({ ...r, score: r.points })), mark('borda')) };
    const schulze = { id: 'schulze', label: METHOD_LABELS.schulze, rows: voteRows(v, v.schulze.ranking.map((r) => ({ ...r, score: r.wins })), mark('schulze')) };
    const [main, other] = v.rules.method === 'borda' ? [borda, schulze] : [schulze, borda];
    return {
      kind: 'votes',
      method: v.rules.method,
      rankedBy: main.label,
      ranking: { kind: v.rules.method },
      overall: main.rows,
      tables: [other],
      topN: v.rules.topN,
      tiePolicy: v.top.policy,
      tie: tieLine(v.top, Math.min(v.rules.topN, v.options.length)),
      tiedAtCutoff: v.top.tiedAtCutoff.map((id) => label.get(id) ?? ''),
      ...base,
      pairwise: { labels: v.options.map((o) => o.text), d: v.schulze.pairwise },
    };
  }
  const counts = v.options.map((o) => v.firstChoices[o.id] ?? 0);
  const ranks = competitionRanks(counts);
  const rows = v.options
    .map((o, i) => ({ optionId: o.id, score: counts[i]!, rank: ranks[i]! }))
    .sort((a, b) => a.rank - b.rank);
  return {
    kind: 'votes',
    method: 'first_choices',
    rankedBy: 'First choices',
    ranking: { kind: 'first_choices' },
    overall: voteRows(v, rows, new Set()),
    tables: [],
    topN: null,
    tiePolicy: null,
    tie: null,
    tiedAtCutoff: [],
    ...base,
  };
}

/** The vote results of the sessions the input covers, read once per build from the voting service. */
function voteResultsOf(input: ResultsInput): Promise<VoteResults[]> {
  return input.memo('votes', async () => {
    const source = input.sources.votes;
    if (!source) return [];
    const title = new Map(input.agenda.map((i) => [i.id, i.title]));
    const out: VoteResults[] = [];
    for (const s of input.sessions) out.push(...(await source.sessionResults(s.id, title)));
    return out;
  });
}

/** Vote results of an activity: dot votes (ranks, ties, criteria matrix), preference votes (both methods, pairwise table), team sorts. */
export const votesProvider: ActivityProvider = async (item, input) => {
  if (!isVoteType(item.type)) return [];
  return (await voteResultsOf(input)).filter((v) => v.itemId === item.id).map(voteSection);
};

/** Every dot and every ballot position of the workshop's closed votes, voter by voter (names as the results show them). */
export const voteRecords: VoteRecordProvider = async (input) => {
  const votes = await voteResultsOf(input);
  if (votes.length === 0) return [];
  const { Vote, VoteDot, VoteRanking } = input.ctx.db.models;
  const rows = await Vote.findAll({ where: { sessionId: input.sessions.map((s) => s.id), status: 'closed' }, order: [['createdAt', 'ASC']] });
  const title = new Map(input.agenda.map((i) => [i.id, i.title]));
  const out: VoteRecord[] = [];
  for (const vote of rows) {
    const session = input.sessionNames.get(vote.sessionId) ?? '';
    const label = new Map(vote.options.map((o) => [o.id, o.text]));
    const criterion = new Map(vote.rules.criteria.map((c) => [c.id, c.label]));
    const activity = title.get(vote.itemId) ?? '';
    const voter = (id: string) => input.names.get(id) ?? 'Participant';
    if (vote.kind === 'dot_vote') {
      const dots = await VoteDot.findAll({ where: { voteId: vote.id } });
      for (const d of dots) {
        if (d.count <= 0) continue;
        out.push({ itemId: vote.itemId, session, activity, voter: voter(d.participantId), option: label.get(d.optionId) ?? '', criterion: criterion.get(d.criterionId) ?? 'Dots', value: d.count });
      }
    } else {
      const rankings = await VoteRanking.findAll({ where: { voteId: vote.id } });
      for (const r of rankings) {
        r.ranking.forEach((optionId, i) =>
          out.push({ itemId: vote.itemId, session, activity, voter: voter(r.participantId), option: label.get(optionId) ?? '', criterion: 'Place in ranking', value: i + 1 }),
        );
      }
    }
  }
  const order = new Map(input.participants.map((p, i) => [input.names.get(p.id), i]));
  return out.sort((a, b) => (a.itemId === b.itemId && a.session === b.session ? (order.get(a.voter) ?? 0) - (order.get(b.voter) ?? 0) : 0));
};

/** Closing reflections: what the room takes away and what happens next. */
export const reflectionsProvider: ActivityProvider = (item, input) => {
  const notes = input.notes.filter((n) => n.itemId === item.id && n.kind === 'reflection');
  return notes.length ? [{ kind: 'reflections', notes }] : [];
};

/**
 * The section providers of an activity, in the order the results show their sections. Each is small
 * and reads only what it needs, so a feature adds its own section by adding a provider here.
 */
export const ACTIVITY_PROVIDERS: ActivityProvider[] = [
  notesProvider,
  votesProvider,
  sketchPhotosProvider,
  storyboardProvider,
  feedbackProvider,
  reflectionsProvider,
];

/** Providers of the raw vote records in the votes export. */
export const VOTE_RECORD_PROVIDERS: VoteRecordProvider[] = [voteRecords];

/** The agenda as it ran: the plan's clock times against the actual starts and ends of every run. */
export function agendaAsRun(input: Pick<ResultsInput, 'workshop' | 'agenda' | 'sessions' | 'now'>): AgendaRunRow[] {
  const schedule = computeSchedule(input.agenda, input.workshop.window, input.workshop.rules);
  const runs = input.sessions.flatMap((s) => s.runs);
  return input.agenda.map((item, i) => {
    const planned = schedule.items[i]!;
    const mine = runs.filter((r) => r.itemId === item.id);
    const ranMs = mine.reduce((sum, r) => sum + Math.max(0, (r.endedAt ?? input.now) - r.startedAt), 0);
    const actualMin = mine.length ? Math.round(ranMs / 6_000) / 10 : null;
    const open = mine.some((r) => r.endedAt === null);
    return {
      itemId: item.id,
      position: i + 1,
      title: item.title,
      type: item.type,
      phase: item.phase,
      plannedStart: planned.start,
      plannedEnd: planned.end,
      plannedMin: item.timeboxMin,
      actualStart: mine.length ? Math.min(...mine.map((r) => r.startedAt)) : null,
      actualEnd: mine.length && !open ? Math.max(...mine.map((r) => r.endedAt!)) : null,
      actualMin,
      overMin: actualMin === null ? null : Math.round((actualMin - item.timeboxMin) * 10) / 10,
      runCount: mine.length,
    };
  });
}

/** Teams of every session covered with their challenges and members. */
function teamResults(input: ResultsInput): TeamResult[] {
  // Teams that gave way to later ones still name the notes of the activities they ran, but the day's teams are the last ones.
  return input.teams.filter((t) => !t.retiredAt).map((t) => ({
    id: t.id,
    session: input.sessionNames.get(t.sessionId) ?? '',
    name: t.name,
    challenge: t.challenge,
    members: input.participants.filter((p) => p.teamId === t.id).map((p) => ({ participantId: p.id, name: input.names.get(p.id)! })),
  }));
}

/** Participants as the exports list them: numbered, named or not, with no address. */
function participantResults(input: ResultsInput): ParticipantResult[] {
  return input.participants.map((p) => ({
    id: p.id,
    session: input.sessionNames.get(p.sessionId) ?? '',
    number: input.numbers.get(p.id)!,
    name: input.names.get(p.id)!,
    teamName: p.teamId ? (input.teamNames.get(p.teamId) ?? null) : null,
    photoConsent: p.photoConsent,
    leftAddress: p.email !== null,
    joinedAt: p.joinedAt.getTime(),
    notes: input.notes.filter((n) => n.participantId === p.id).length,
  }));
}

/** Participation: who joined, consented and left an address, and who contributed to each activity. */
function participationOf(input: ResultsInput, votes: VoteResults[]): Participation {
  const joined = input.participants.length;
  const perActivity = input.agenda
    .map((item) => {
      const notes = input.notes.filter((n) => n.itemId === item.id);
      // A vote's contributors are those who voted (as its own "N of M voted" counts them).
      const mine = votes.filter((v) => v.itemId === item.id);
      const voted = mine.reduce((sum, v) => sum + v.participation.voted, 0);
      const contributors = Math.max(voted, new Set(notes.map((n) => n.participantId)).size);
      // A vote's contributions are its ballots, not notes: counting its notes would read "0 notes" beside "3 of 3 voted".
      const ballots = isVoteType(item.type) ? voted : null;
      return { itemId: item.id, title: item.title, contributors, notes: notes.length, ballots, rate: joined === 0 ? 0 : Math.min(1, contributors / joined) };
    })
    .filter((a) => a.notes > 0 || a.contributors > 0);
  return {
    joined,
    withPhotoConsent: input.participants.filter((p) => p.photoConsent).length,
    withAddress: input.participants.filter((p) => p.email !== null).length,
    notesTotal: input.notes.length,
    perActivity,
  };
}

/** A stored submission as the results show it. */
function toNote(row: SubmissionRow, input: Pick<ResultsInput, 'names' | 'teamNames' | 'sessionNames'>, themeNames: Map<string, string>): NoteResult {
  return {
    id: row.id,
    sessionId: row.sessionId,
    session: input.sessionNames.get(row.sessionId) ?? '',
    itemId: row.itemId,
    participantId: row.participantId,
    author: input.names.get(row.participantId) ?? 'Participant',
    teamId: row.teamId,
    teamName: row.teamId ? (input.teamNames.get(row.teamId) ?? null) : null,
    kind: row.kind,
    part: row.part,
    text: row.text,
    fields: row.fields,
    themeId: row.themeId,
    themeName: row.themeId ? (themeNames.get(row.themeId) ?? null) : null,
    createdAt: row.createdAt.getTime(),
  };
}

/** Names of the affinity themes the facilitators grouped notes into. */
async function themeNamesOf(ctx: AppContext, sessionIds: string[]): Promise<Map<string, string>> {
  if (sessionIds.length === 0) return new Map();
  const rows = await ctx.db.models.Theme.findAll({ where: { sessionId: sessionIds }, order: [['position', 'ASC']] });
  return new Map(rows.map((r) => [r.id, r.name]));
}

/** The input narrowed to one of its sessions, with its own memo: what a provider builds from it comes from that session alone. */
function narrowTo(input: ResultsInput, session: LiveSessionRow): ResultsInput {
  const cache = new Map<string, Promise<unknown>>();
  return {
    ...input,
    sessions: [session],
    participants: input.participants.filter((p) => p.sessionId === session.id),
    teams: input.teams.filter((t) => t.sessionId === session.id),
    notes: input.notes.filter((n) => n.sessionId === session.id),
    memo: <T>(key: string, load: () => Promise<T>) => {
      if (!cache.has(key)) cache.set(key, load());
      return cache.get(key) as Promise<T>;
    },
  };
}

/**
 * A workshop's results after the day: the brief, the agenda as run, every activity's results in
 * agenda order (each section from a provider), teams, participants, participation and next steps.
 */
export class ResultsService {
  constructor(
    private ctx: AppContext,
    private sources: ResultsSources = {},
  ) {}

  /** Reads everything the providers need, once, for the sessions chosen (the day's by default). */
  async input(workshopId: string, anonymize: boolean, now = Date.now(), selector: SessionSelector = 'day'): Promise<ResultsInput> {
    const { Workshop, User, AgendaItem, LiveSession, Participant, Team, Submission } = this.ctx.db.models;
    const workshop = await Workshop.findByPk(workshopId);
    if (!workshop) throw errors.notFound('workshop');
    const [owner, itemRows, sessions] = await Promise.all([
      User.findByPk(workshop.ownerId, { attributes: ['id', 'name'] }),
      AgendaItem.findAll({ where: { workshopId }, order: [['position', 'ASC']] }),
      LiveSession.findAll({ where: { workshopId }, order: [['startedAt', 'ASC']] }),
    ]);
    const allSessions = sessions;
    const covered = selectSessions(
      allSessions.map((s) => ({ id: s.id, kind: s.kind ?? 'day', row: s })),
      selector,
    ).map((s) => s.row);
    const sessionNames = new Map(allSessions.map((s) => [s.id, sessionName(s.kind ?? 'day', s.startedAt.getTime())]));
    const sessionIds = covered.map((s) => s.id);
    const sessionOrder = new Map(sessionIds.map((id, i) => [id, i]));
    const [people, teams, submissions, themeNames] = await Promise.all([
      Participant.findAll({ where: { sessionId: sessionIds } }),
      Team.findAll({ where: { sessionId: sessionIds } }),
      // Hidden notes and duplicates merged into another note were moderated away; the results leave them out.
      Submission.findAll({ where: { sessionId: sessionIds, hidden: false, mergedIntoId: null }, order: [['createdAt', 'ASC']] }),
      themeNamesOf(this.ctx, sessionIds),
    ]);
    const participants = [...people].sort(
      (a, b) => sessionOrder.get(a.sessionId)! - sessionOrder.get(b.sessionId)! || a.joinedAt.getTime() - b.joinedAt.getTime() || a.id.localeCompare(b.id),
    );
    teams.sort((a, b) => sessionOrder.get(a.sessionId)! - sessionOrder.get(b.sessionId)! || a.position - b.position);
    const numbers = new Map(participants.map((p, i) => [p.id, i + 1]));
    const names = new Map(participants.map((p) => [p.id, anonymize ? anonymousName(numbers.get(p.id)!) : p.displayName]));
    const teamNames = new Map(teams.map((t) => [t.id, t.name]));
    const cache = new Map<string, Promise<unknown>>();
    const input: ResultsInput = {
      ctx: this.ctx,
      sources: this.sources,
      workshop,
      ownerName: owner?.name ?? '',
      agenda: itemRows.map(toAgendaItem),
      sessions: covered,
      allSessions,
      selector,
      sessionNames,
      participants,
      numbers,
      names,
      teams,
      teamNames,
      notes: [],
      themeOrder: [...themeNames.keys()],
      anonymized: anonymize,
      now,
      memo: <T>(key: string, load: () => Promise<T>) => {
        if (!cache.has(key)) cache.set(key, load());
        return cache.get(key) as Promise<T>;
      },
    };
    input.notes = submissions.map((s) => toNote(s, input, themeNames));
    return input;
  }

  /** The workshop's results for the sessions chosen (the day's by default); with `anonymize`, every participant is "Participant N". */
  async results(workshopId: string, anonymize = false, now = Date.now(), selector: SessionSelector = 'day'): Promise<WorkshopResults> {
    const input = await this.input(workshopId, anonymize, now, selector);
    return this.build(input);
  }

  /** Builds the results from a read input, calling every provider. */
  async build(input: ResultsInput): Promise<WorkshopResults> {
    const { workshop } = input;
    const activities: ActivityResult[] = [];
    const perSession = input.sessions.map((s) => ({ session: s, input: narrowTo(input, s) }));
    for (const [i, item] of input.agenda.entries()) {
      const sections: ResultSection[] = [];
      // Each section comes from one session and says which: a rehearsal's notes never mix with the day's.
      for (const { session, input: one } of perSession) {
        for (const provide of ACTIVITY_PROVIDERS) {
          for (const section of await provide(item, one)) sections.push({ ...section, sessionId: session.id, session: input.sessionNames.get(session.id) ?? '' });
        }
      }
      // The prompt names the dots the vote ran with (the first covered session's), as the phones showed it.
      const ran = (await voteResultsOf(input)).find((v) => v.itemId === item.id && v.kind === 'dot_vote');
      activities.push({ itemId: item.id, position: i + 1, title: item.title, type: item.type, phase: item.phase, prompt: showPrompt(item, ran?.rules.dotsPerVoter), sections });
    }
    const votes: VoteRecord[] = [];
    for (const provide of VOTE_RECORD_PROVIDERS) votes.push(...(await provide(input)));
    return {
      generatedAt: input.now,
      anonymized: input.anonymized,
      workshop: {
        id: workshop.id,
        title: workshop.title,
        objective: workshop.objective,
        persona: workshop.persona,
        date: workshop.date,
        window: workshop.window,
        ownerName: input.ownerName,
        headcount: workshop.headcount,
      },
      sessions: input.allSessions.map((s) => {
        const included = input.sessions.includes(s);
        return {
          id: s.id,
          kind: s.kind ?? 'day',
          name: input.sessionNames.get(s.id) ?? '',
          status: s.status,
          startedAt: s.startedAt.getTime(),
          endedAt: s.endedAt?.getTime() ?? null,
          included,
          agenda: included ? agendaAsRun({ ...input, sessions: [s] }) : [],
        };
      }),
      sessionSelector: input.selector,
      agenda: agendaAsRun({ ...input, sessions: input.sessions.length === 1 ? input.sessions : [] }),
      activities,
      notes: input.notes,
      teams: teamResults(input),
      participants: participantResults(input),
      participation: participationOf(input, await voteResultsOf(input)),
      votes,
      nextSteps: input.notes.filter((n) => n.kind === 'reflection' && n.part === 'next_step'),
      personalDataDeletedAt: workshop.personalDataDeletedAt?.getTime() ?? null,
    };
  }
}
