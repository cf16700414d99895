import { ClientError } from '../api/errors';
import type { FieldIssue } from '../../shared/errors';
import { COUNTS, PERCENTS } from '../../shared/field-nouns';
import { i18n } from './index';

/*
 * What the facilitator's screens (sign-in, plan, console, results, accounts) say about a failed call, in the
 * screen's language, from the facilitator's catalogs: the server sends a code, a finer reason and values
 * (shared/reasons.ts), never words these screens show. The phone's counterpart is src/i18n/errors.ts.
 */

type Key = Parameters<typeof i18n.global.t>[0];
type Params = Record<string, string | number>;

/** Whether the catalogs have a message under `key` (in the current language or English). */
function known(key: string): boolean {
  return i18n.global.te(key) || i18n.global.te(key, 'en');
}
const say = (key: string, params: Params = {}, plural?: number): string =>
  plural === undefined ? i18n.global.t(key as Key, params) : i18n.global.t(key as Key, params, plural);

/**
 * The message for anything a call threw: the server's reason with its values (`problem.<reason>`), else what
 * its code means (`problemCode.<code>`), else `fallback` (what the screen was doing, already translated). A
 * programming error's text, and the server's English, never reach the screen.
 * @example Notify.create({ type: 'negative', message: problemText(err, t('agenda.failed')) })
 */
export function problemText(err: unknown, fallback: string): string {
  if (!(err instanceof ClientError)) return fallback;
  const { reason, params } = err.detail;
  // A rejected input (a form's, or a socket payload's `payload_invalid`) says its first field by name and what is
  // wrong with it: "Title: Keep this to 120 characters or fewer".
  const field = namedField(err.detail.fieldIssues ?? {});
  if (field) return field;
  if (reason) {
    // A message with plural forms counts by its `n` or `count`.
    const count = params?.n ?? params?.count;
    const plural = typeof count === 'number' ? count : undefined;
    if (known(`problem.${reason}`)) return say(`problem.${reason}`, params, plural);
    // A participant's reason the console meets too ("Voting has not started yet").
    if (known(`error.${reason}`)) return say(`error.${reason}`, params, plural);
  }
  // An `internal` error the client made itself (status 0, no reason) carries the screen's own fallback.
  if (err.code === 'internal' && err.status === 0) return fallback || err.message;
  // The server's own failure (`internal` with a status) says so in the screen's words, never the server's English.
  if (known(`problemCode.${err.code}`)) return say(`problemCode.${err.code}`);
  return fallback;
}

/** The first rejected field the catalogs have a name for (`problemFieldName.<last key>`), with its problem, or `null`. */
function namedField(issues: Record<string, FieldIssue>): string | null {
  for (const [path, issue] of Object.entries(issues)) {
    const last = path.split('.').at(-1) ?? path;
    if (known(`problemFieldName.${last}`)) return say('problemFieldName.said', { field: say(`problemFieldName.${last}`), problem: issueText(path, issue) });
  }
  return null;
}

/**
 * One rejected field's message, written for a person, from its issue's code and limits: "At least 1 team",
 * "Use a 24-hour time such as 09:30". The field's last key names what it counts (shared/field-nouns.ts).
 * @example issueText('teamCount', { code: 'too_small', params: { min: 1, of: 'number' } }) // "At least 1 team"
 */
export function issueText(field: string, issue: FieldIssue): string {
  const p = issue.params ?? {};
  const last = field.split('.').at(-1) ?? field;
  const noun = PERCENTS.has(last) ? 'percent' : (COUNTS[last]?.replace(/ /g, '_') ?? null);
  const own = `problemField.${issue.code}`;
  switch (issue.code) {
    case 'too_small':
    case 'too_big': {
      const small = issue.code === 'too_small';
      const n = Number(small ? p.min : p.max);
      if (p.of === 'string') return small ? (n <= 1 ? say('problemField.required') : say('problemField.tooShort', { n }, n)) : say('problemField.tooLong', { n }, n);
      if (small && n === 0 && !p.exclusive) return say('problemField.notNegative');
      const list = p.of === 'array' || p.of === 'set';
      const what = noun && known(`problemField.count.${noun}`) ? noun : list ? 'item' : 'number';
      const amount = say(`problemField.count.${what}`, { n }, n);
      const bound = p.exclusive ? (small ? 'moreThan' : 'lessThan') : small ? 'atLeast' : 'atMost';
      return say(`problemField.${bound}`, { amount });
    }
    case 'invalid_type':
      if (p.expected === 'int') return say('problemField.wholeNumber');
      if (p.expected === 'number') return say('problemField.number');
      return say('problemField.required');
    case 'invalid_format':
      return say(p.format === 'email' ? 'problemField.email' : p.format === 'url' ? 'problemField.url' : 'problemField.format');
    case 'invalid_value':
      return say('problemField.choose');
    default:
      return known(own) ? say(own, p) : say('problemField.custom');
  }
}

/** Every rejected field of a failed call, keyed by dotted path, in the screen's language; `{}` for anything else. */
export function problemFields(err: unknown): Record<string, string> {
  if (!(err instanceof ClientError)) return {};
  const issues = err.detail.fieldIssues ?? {};
  return Object.fromEntries(Object.keys({ ...err.fields, ...issues }).map((f) => [f, issues[f] ? issueText(f, issues[f]) : say('problemField.custom')]));
}

/**
 * Every issue of a zod check run on the screen (the same schema the server checks), keyed by dotted path, in
 * the screen's language.
 * @example const r = WorkshopBrief.safeParse(form); r.success ? {} : issueTexts(fieldIssues(r.error))
 */
export function issueTexts(issues: Record<string, FieldIssue>): Record<string, string> {
  return Object.fromEntries(Object.entries(issues).map(([f, issue]) => [f, issueText(f, issue)]));
}
