import { z } from 'zod';
import { Criterion } from './agenda-item';
import { OVERALL_CRITERION } from '../tally';
import { MATRIX_RANKING } from '../matrix';
import { VOTE_KINDS } from '../activities';

/** The activity types that are votes: a dot vote, a preference vote (Cairn's) and a team sort (Cairn's); declared in the activity library. */
export const VoteKind = z.enum(VOTE_KINDS);
/** A kind of vote, e.g. `'dot_vote'`. */
export type VoteKind = z.infer<typeof VoteKind>;

/** Where a vote stands: set up but not open yet, open for votes, or closed (votes are final). */
export const VoteStatus = z.enum(['draft', 'open', 'closed']);
/** Where a vote stands. */
export type VoteStatus = z.infer<typeof VoteStatus>;

/** Most options one vote may offer: a wall of sticky notes, not a catalogue. */
export const MAX_VOTE_OPTIONS = 30;
/** Longest option text (a how-might-we question fits easily). */
export const MAX_OPTION_TEXT = 300;

/** One option of a vote: its text, and the note it was promoted from, if any. */
export const VoteOption = z.object({
  id: z.string(),
  text: z.string(),
  /** The submission (note, how-might-we question …) this option was promoted from. */
  submissionId: z.string().nullable(),
});
/** One option of a vote. */
export type VoteOption = z.infer<typeof VoteOption>;

/** The counting methods of a preference vote (shared/preference.ts). */
export const PreferenceMethod = z.enum(['schulze', 'borda']);
/** A counting method of a preference vote. */
export type PreferenceMethod = z.infer<typeof PreferenceMethod>;

/** The rules of a vote as the server keeps them; dot-vote fields are ignored by the other kinds. */
export const VoteRules = z
  .object({
    /** Dots each voter may spend, per criterion. */
    dotsPerVoter: z.number().int().min(1).max(50),
    /** Most dots one voter may put on one option (per criterion). */
    capPerOption: z.number().int().min(1).max(50),
    /** Whether a voter may put more than one dot on an option. */
    allowStacking: z.boolean(),
    /** The criteria (none means one overall criterion). */
    criteria: z.array(Criterion).max(4),
    /** How many options to carry forward. */
    topN: z.number().int().min(1).max(20),
    /** What the top N is ranked by: `'overall'` (every criterion's dots together), `'matrix'` (two criteria: first high, second low first) or one criterion's id. */
    rankBy: z.string().min(1).max(40),
    /** Preference vote: the method whose order carries the top N forward (both are always shown). */
    method: PreferenceMethod,
  })
  .refine((r) => new Set(r.criteria.map((c) => c.id)).size === r.criteria.length, {
    message: 'Give each criterion its own id',
    path: ['criteria'],
  })
  .refine((r) => r.criteria.every((c) => c.id !== OVERALL_CRITERION && c.id !== MATRIX_RANKING), {
    message: `'${OVERALL_CRITERION}' and '${MATRIX_RANKING}' are kept for the rankings; name the criterion differently`,
    path: ['criteria'],
  })
  .refine(
    (r) =>
      r.rankBy === OVERALL_CRITERION || (r.rankBy === MATRIX_RANKING && r.criteria.length >= 2) || r.criteria.some((c) => c.id === r.rankBy),
    {
      message: 'Rank by all criteria together, by the matrix of two criteria, or by one of the criteria',
      path: ['rankBy'],
    },
  );
/** The rules of a vote. */
export type VoteRules = z.infer<typeof VoteRules>;

/** An option as the facilitator sets it up: typed text, or a note promoted by its submission id. */
export const VoteOptionInput = z.union([
  z.object({ text: z.string().trim().min(1, 'Write the option first').max(MAX_OPTION_TEXT, `Keep an option under ${MAX_OPTION_TEXT} characters`) }).strict(),
  z.object({ submissionId: z.string().min(1).max(64) }).strict(),
]);
/** An option as the facilitator sets it up. */
export type VoteOptionInput = z.infer<typeof VoteOptionInput>;

/** Payload of `vote:setup`: the options and (any of) the rules of the current item's vote. */
export const VoteSetupPayload = z
  .object({
    options: z
      .array(VoteOptionInput)
      .min(2, 'A vote needs at least two options')
      .max(MAX_VOTE_OPTIONS, `A vote has at most ${MAX_VOTE_OPTIONS} options`),
    rules: z
      .object({
        dotsPerVoter: z.number().int().min(1).max(50),
        capPerOption: z.number().int().min(1).max(50),
        allowStacking: z.boolean(),
        criteria: z.array(Criterion.strict()).max(4),
        topN: z.number().int().min(1).max(20),
        rankBy: z.string().min(1).max(40),
        method: PreferenceMethod,
      })
      .partial()
      .strict()
      .optional(),
  })
  .strict();
/** Payload of `vote:setup`. */
export type VoteSetupPayload = z.infer<typeof VoteSetupPayload>;

/** Payload of `vote:dot`: add (`+1`) or take back (`-1`) one dot; `clientId` makes a retry land once. */
export const DotPayload = z
  .object({
    clientId: z.string().min(8).max(64),
    optionId: z.string().min(1).max(64),
    criterionId: z.string().min(1).max(40),
    delta: z.union([z.literal(1), z.literal(-1)]),
  })
  .strict();
/** Payload of `vote:dot`. */
export type DotPayload = z.infer<typeof DotPayload>;

/** Payload of `vote:rank`: the options in order of preference, favourite first; `clientId` makes a retry land once. */
export const RankPayload = z
  .object({
    clientId: z.string().min(8).max(64),
    ranking: z.array(z.string().min(1).max(64)).min(1).max(MAX_VOTE_OPTIONS),
  })
  .strict();
/** Payload of `vote:rank`. */
export type RankPayload = z.infer<typeof RankPayload>;

/** Payload of `vote:choose`: the options carried forward (the top N, with ties broken by the facilitator). */
export const ChoosePayload = z.object({ optionIds: z.array(z.string().min(1).max(64)).min(1).max(20) }).strict();
/** Payload of `vote:choose`. */
export type ChoosePayload = z.infer<typeof ChoosePayload>;

/** Payload of `teams:propose`: optionally the largest team the facilitator allows (otherwise sizes differ by at most one). */
export const ProposeTeamsPayload = z.object({ maxTeamSize: z.number().int().min(1).max(200).optional() }).strict();
/** Payload of `teams:propose`. */
export type ProposeTeamsPayload = z.infer<typeof ProposeTeamsPayload>;

/** One participant's dots on one option for one criterion. */
export const MyDot = z.object({ optionId: z.string(), criterionId: z.string(), count: z.number().int() });
/** One participant's dots on one option for one criterion. */
export type MyDot = z.infer<typeof MyDot>;

/** A participant's own ballot: their dots (dot vote) or their order (preference vote, team sort). */
export const MyBallot = z.object({
  itemId: z.string(),
  dots: z.array(MyDot),
  ranking: z.array(z.string()).nullable(),
});
/** A participant's own ballot. */
export type MyBallot = z.infer<typeof MyBallot>;

/** A vote as every screen sees it (no tallies); `mine` is the asking participant's own ballot. */
export const VoteView = z.object({
  itemId: z.string(),
  kind: VoteKind,
  status: VoteStatus,
  /** Whether the facilitator has set the vote up (options chosen); before that, `options` is empty. */
  ready: z.boolean(),
  options: z.array(VoteOption),
  rules: VoteRules,
  /**
   * The options carried forward once the facilitator confirmed the top N (dot and preference votes);
   * for a team sort, its challenges once the facilitator confirmed the teams (`null` until then).
   */
  chosen: z.array(z.string()).nullable(),
  mine: MyBallot.nullable(),
});
/** A vote as every screen sees it. */
export type VoteView = z.infer<typeof VoteView>;

/** What a phone hears back after a dot or a ranking: its ballot now, and whether this was a retry already applied. */
export const BallotAnswer = z.object({ duplicate: z.boolean(), mine: MyBallot });
/** What a phone hears back after a dot or a ranking. */
export type BallotAnswer = z.infer<typeof BallotAnswer>;

/** One option's line in a dot tally (see shared/tally.ts). */
export const TallyRowView = z.object({
  optionId: z.string(),
  dots: z.number(),
  rank: z.number().int(),
  tied: z.boolean(),
  nearTie: z.boolean(),
});

/** Who in the room has voted; `dotsLeft` only for dot votes. */
export const Participation = z.object({
  voters: z.number().int(),
  voted: z.number().int(),
  rate: z.number(),
  dotsLeft: z.number().int().nullable(),
});
/** Who in the room has voted. */
export type Participation = z.infer<typeof Participation>;

const ResultsBase = {
  itemId: z.string(),
  itemTitle: z.string(),
  status: VoteStatus,
  options: z.array(VoteOption),
  rules: VoteRules,
  participation: Participation,
  chosen: z.array(z.string()).nullable(),
};

/** The top N by the tie policy of shared/tally.ts selectTopN: those inside, and those tied across the cut-off. */
export const TopN = z.object({
  selected: z.array(z.string()),
  tiedAtCutoff: z.array(z.string()),
  /** The options across the cut-off got no votes at all: no tie, but places to fill by picking. */
  unvotedAtCutoff: z.boolean(),
  policy: z.string(),
});

/** Results of a dot vote: tallies per criterion and overall, the top N by the tie policy, and the criteria matrix. */
export const DotVoteResults = z.object({
  kind: z.literal('dot_vote'),
  ...ResultsBase,
  perCriterion: z.record(z.string(), z.array(TallyRowView)),
  overall: z.array(TallyRowView),
  /** The ranking the rules name (overall, one criterion, or the matrix), which the top N is cut from; every screen shows this order. */
  ranked: z.array(TallyRowView),
  top: TopN,
  /**
   * With two criteria or more: each option's dots under the first two (x: the second, y: the first), where it
   * stands under each (shared/matrix.ts), and its rank by the matrix, in that rank order.
   */
  matrix: z
    .object({
      xCriterionId: z.string(),
      yCriterionId: z.string(),
      points: z.array(
        z.object({
          optionId: z.string(),
          x: z.number(),
          y: z.number(),
          xLevel: z.enum(['high', 'low']),
          yLevel: z.enum(['high', 'low']),
          rank: z.number().int(),
          tied: z.boolean(),
        }),
      ),
    })
    .nullable(),
});
/** Results of a dot vote. */
export type DotVoteResults = z.infer<typeof DotVoteResults>;

/** Results of a preference vote: Borda count, the Schulze method and the pairwise table. */
export const PreferenceResults = z.object({
  kind: z.literal('preference_vote'),
  ...ResultsBase,
  borda: z.array(z.object({ optionId: z.string(), points: z.number(), rank: z.number().int() })),
  schulze: z.object({
    /** `pairwise[i][j]`: voters who prefer option i to option j (options in `options` order). */
    pairwise: z.array(z.array(z.number())),
    strongest: z.array(z.array(z.number())),
    ranking: z.array(z.object({ optionId: z.string(), rank: z.number().int(), wins: z.number().int() })),
  }),
  /** The top N by the method the rules name. */
  top: TopN,
});
/** Results of a preference vote. */
export type PreferenceResults = z.infer<typeof PreferenceResults>;

/** Results of a team sort so far: how many have ranked the challenges (the teams come from `teams:propose`). */
export const TeamSortResults = z.object({
  kind: z.literal('team_sort'),
  ...ResultsBase,
  /** First choices per challenge, for a glance at demand. */
  firstChoices: z.record(z.string(), z.number().int()),
});
/** Results of a team sort so far. */
export type TeamSortResults = z.infer<typeof TeamSortResults>;

/** The results of a vote, by kind. */
export const VoteResults = z.discriminatedUnion('kind', [DotVoteResults, PreferenceResults, TeamSortResults]);
/** The results of a vote, by kind. */
export type VoteResults = z.infer<typeof VoteResults>;

/** Cairn's proposal of teams from a team sort: one team per challenge, sizes differing by at most one. */
export const TeamProposal = z.object({
  itemId: z.string(),
  teams: z.array(z.object({ optionId: z.string(), challenge: z.string(), memberIds: z.array(z.string()) })),
  /** Where each person landed; `choice` is the challenge's place in their ranking (1 = first), 0 if they ranked none. */
  outcome: z.array(
    z.object({ participantId: z.string(), displayName: z.string(), optionId: z.string(), choice: z.number().int() }),
  ),
  /** Total preference cost (0 for a first choice, 1 for a second …). */
  cost: z.number(),
});
/** Cairn's proposal of teams from a team sort. */
export type TeamProposal = z.infer<typeof TeamProposal>;

/** What the facilitator may turn into options: earlier notes of the session and earlier votes' chosen options. */
export const VoteSources = z.object({
  /**
   * The notes and themes the facilitators promoted to options of a later vote, in the order promoted:
   * offered first. A note is taken by its `submissionId`, a theme by its name (`text`).
   */
  promoted: z.array(
    z.object({
      promotionId: z.string(),
      sourceKind: z.enum(['note', 'theme']),
      submissionId: z.string().nullable(),
      itemId: z.string(),
      itemTitle: z.string(),
      text: z.string(),
    }),
  ),
  /** Earlier notes, newest first; `promoted` marks those promoted to a vote. */
  notes: z.array(
    z.object({ submissionId: z.string(), itemId: z.string(), itemTitle: z.string(), kind: z.string(), text: z.string(), promoted: z.boolean() }),
  ),
  winners: z.array(z.object({ itemId: z.string(), itemTitle: z.string(), texts: z.array(z.string()) })),
});
/** What the facilitator may turn into options. */
export type VoteSources = z.infer<typeof VoteSources>;
