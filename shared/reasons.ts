// No zod here: the live moves (shared/live-moves.ts) name their reasons, and the phone's scripts import them.

/**
 * The finer reasons behind a participant-facing error and the values each message fills in, each a message in
 * the participant's catalogs (`error.<reason>`, src/i18n/locales): the phone shows it in its participant's language.
 */
export const PARTICIPANT_REASONS = {
  join_code_unknown: ['code'],
  join_ended: [],
  note_wrong_activity: [],
  photo_unreadable: [],
  photo_too_many_pixels: [],
  vote_closed: [],
  vote_not_open: [],
  not_in_session: [],
  // An account's open screen lost its rights (shared/events.ts `access:revoked`).
  revoked_signed_out: [],
  revoked_disabled: [],
  revoked_removed: [],
  revoked_demoted: [],
  // A socket payload the command's schema refused, by the first field's dotted path (server/common/command.ts).
  payload_invalid: ['field'],
  // Notes an activity refuses (server/features/activities/activities.service.ts).
  note_not_taken: [],
  note_other_kind: [],
  note_part_missing: [],
  note_no_parts: [],
  note_extra_fields: [],
  note_photo_first: [],
  photo_wrong_activity: [],
  sketch_gone: [],
  feedback_own_sketch: [],
  feedback_part_missing: [],
  feedback_team_missing: [],
  feedback_own_team: [],
  feedback_wrong_activity: [],
  round_not_number: [],
  partner_not_here: [],
  // Photos (server/features/activities/photos.service.ts, uploads.router.ts).
  photo_none: [],
  photo_not_taken: [],
  photo_limit: ['count'],
  photo_storing: [],
  photo_too_large: ['mb'],
  photo_one_at_a_time: [],
  upload_unreadable: [],
  // Ballots (shared/tally.ts checkBallot, server/features/voting).
  ballot_wrong_kind: [],
  rank_each_once: [],
  results_hidden: [],
  dot_whole: [],
  dot_criterion_unknown: [],
  dot_none_back: [],
  dot_one_each: [],
  dot_one_each_for: ['criterion'],
  dot_cap: ['count'],
  dot_cap_for: ['count', 'criterion'],
  dot_budget: ['count', 'left'],
  dot_budget_for: ['count', 'left', 'criterion'],
  // Too many tries (server/features/live/live.router.ts, server/common/socket-rate-limit.ts).
  join_tries_phone: [],
  join_tries_network: [],
  join_crowded: [],
  join_too_often: [],
  too_many_actions: [],
} as const satisfies Record<string, readonly string[]>;

/**
 * The finer reasons behind an error a facilitator, co-facilitator, observer or admin sees, and the values each
 * message fills in, each a message in the facilitator's catalogs (`problem.<reason>`, src/i18n/facilitator).
 * `tests/shared/error-reasons.test.ts` walks both tables against every catalog.
 */
export const FACILITATOR_REASONS = {
  // Something named was not found.
  workshop_missing: [],
  item_missing: [],
  live_session_missing: [],
  session_missing: [],
  account_missing: [],
  invitation_missing: [],
  member_missing: [],
  vote_missing: [],
  theme_missing: [],
  notes_missing: [],
  promotion_missing: [],
  activity_missing: [],
  photo_missing: [],
  dev_inbox_missing: [],
  no_live_session: [],
  // Accounts, sign-in, invitations.
  sign_in_failed: [],
  account_disabled: [],
  current_password_wrong: [],
  reset_link_invalid: [],
  account_exists: [],
  own_account: [],
  already_member: [],
  invitation_other_account: ['email'],
  already_lead: [],
  invitation_invalid: [],
  no_role: [],
  no_role_any_more: [],
  runners_only: [],
  watch_first: [],
  // The plan.
  reorder_incomplete: [],
  // The live session.
  live_session_running: [],
  session_still_live: [],
  data_deleted: [],
  last_item: [],
  first_item: [],
  no_such_item: ['count', 'number'],
  timer_not_running: [],
  timer_ended: [],
  item_not_on_agenda: [],
  item_not_after_current: ['title'],
  no_cut_to_undo: [],
  no_cuts_to_write: [],
  join_code_draw_failed: [],
  // Results and the report.
  report_members_only: [],
  report_participants_only: [],
  mail_refused: [],
  // Votes.
  notes_not_votable: [],
  duplicate_option: ['text'],
  options_while_open: [],
  options_after_ballots: [],
  not_a_vote: [],
  team_sort_confirm: [],
  close_vote_first: [],
  pick_each_once: [],
  pick_n_options: ['n'],
  keep_top_n: [],
  only_ties_extra: [],
  only_team_sort: [],
  nobody_to_sort: [],
  teams_too_small: ['people', 'teams', 'size'],
  vote_needs_options: [],
  activity_moved_on: [],
  vote_not_opened: [],
  no_such_option: [],
  // Teams and the activities' boards.
  one_team_each: [],
  team_members_joined: [],
  merge_needs_other: [],
  merge_same_activity: [],
  one_theme_each: [],
  promote_merged: [],
  promote_hidden: [],
  no_rounds: [],
  storyboard_only: [],
  frame_once: [],
  frames_unknown: [],
  theme_own_activity: [],
  theme_merged: [],
} as const satisfies Record<string, readonly string[]>;

/** Every reason and the values its message fills in. */
export const REASON_PARAMS: Readonly<Record<string, readonly string[]>> = { ...PARTICIPANT_REASONS, ...FACILITATOR_REASONS };

/** An error's reason, e.g. `'join_code_unknown'`. */
export type ErrorReason = keyof typeof PARTICIPANT_REASONS | keyof typeof FACILITATOR_REASONS;

type Reasons = typeof PARTICIPANT_REASONS & typeof FACILITATOR_REASONS;
/** The values a reason's message fills in, by name. */
export type ReasonParams<R extends ErrorReason> = Record<Reasons[R][number], string | number>;
/** A reason with its values, as an error carries them. */
export type Why = { reason: ErrorReason; params?: Record<string, string | number> };

/**
 * A reason with exactly the values its message fills in (checked by the compiler).
 * @example because('pick_n_options', { n: 3 })
 */
export function because<R extends ErrorReason>(reason: R, ...params: Reasons[R] extends readonly [] ? [] : [ReasonParams<R>]): Why {
  return params[0] ? { reason, params: params[0] as Record<string, string | number> } : { reason };
}
