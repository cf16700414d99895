import { ClientError } from '../api/errors';
import type { ErrorParams, FieldIssue } from '../../shared/errors';
import { i18n } from './index';

type Key = Parameters<typeof i18n.global.t>[0];

/** Whether the catalogs have a message under `key` (in the current language or English). */
function known(key: string): boolean {
  return i18n.global.te(key) || i18n.global.te(key, 'en');
}

/** A message with its values; one with plural forms counts by its `count` or `n`. */
function say(key: string, params: ErrorParams = {}): string {
  const count = params.count ?? params.n;
  return typeof count === 'number' ? i18n.global.t(key as Key, params, count) : i18n.global.t(key as Key, params);
}

/**
 * What a participant's screen says about a failed call, in its language: a rejected field it can name
 * ("Note: keep it to 500 characters"), else the server's finer reason with its values (`error.<reason>`),
 * else its error code (`error.<code>`), else `fallbackKey`. The server's English never reaches the screen.
 */
export function errorText(err: unknown, fallbackKey: Key = 'error.internal'): string {
  const t = i18n.global.t;
  // An API error or a socket command's (stores/live.ts, not imported: the join page loads no socket).
  if (err instanceof Error && 'code' in err && 'detail' in err) {
    const { code } = err as { code: string };
    const { reason, params, fieldIssues } = (err.detail ?? {}) as { reason?: string; params?: ErrorParams; fieldIssues?: Record<string, FieldIssue> };
    const named = fieldIssues ? namedIssue(fieldIssues) : null;
    if (named) return named;
    if (reason && known(`error.${reason}`)) return say(`error.${reason}`, params ?? {});
    if (known(`error.${code}`)) return t(`error.${code}` as Key);
  }
  return t(fallbackKey);
}

/** The first rejected field a phone has a name for (`fieldName.<last key>`), with its problem, or `null`. */
function namedIssue(issues: Record<string, FieldIssue>): string | null {
  for (const [path, issue] of Object.entries(issues)) {
    const last = path.split('.').at(-1) ?? path;
    if (!known(`fieldName.${last}`)) continue;
    return t2('fieldName.said', { field: t2(`fieldName.${last}`), problem: issueWords(issue) });
  }
  return null;
}
const t2 = (key: string, params: Record<string, string> = {}): string => i18n.global.t(key as Key, params);

/** One rejected field's problem in the participant's words (`field.<code>` with its limits). */
function issueWords(issue: FieldIssue): string {
  const params = issue.params ?? {};
  const limit = Number(params.max ?? params.min ?? 0);
  // "At least 1 character" is a field left empty.
  const key = issue.code === 'too_small' && limit <= 1 ? 'field.required' : `field.${issue.code}`;
  return known(key) ? i18n.global.t(key as Key, params, limit) : i18n.global.t('error.validation_failed');
}

/** A rejected field in the participant's language (`field.<code>` with its limits), `undefined` when the field is fine. */
export function fieldText(err: unknown, field: string): string | undefined {
  if (!(err instanceof ClientError)) return undefined;
  const issue: FieldIssue | undefined = err.detail.fieldIssues?.[field];
  if (!issue) return err.fields[field] === undefined ? undefined : i18n.global.t('error.validation_failed');
  return issueWords(issue);
}
