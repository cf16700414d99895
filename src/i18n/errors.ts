import { ClientError } from '../api/errors';
import type { ErrorParams, FieldIssue } from '../../shared/errors';
import { i18n } from './index';

type Key = Parameters<typeof i18n.global.t>[0];

/** Whether the catalogs have a message under `key` (in the current language or English). */
function known(key: string): boolean {
  return i18n.global.te(key) || i18n.global.te(key, 'en');
}

/**
 * What a participant's screen says about a failed call, in its language: the server's finer reason
 * with its values (`error.<reason>`), else its error code (`error.<code>`), else `fallbackKey`.
 */
export function errorText(err: unknown, fallbackKey: Key = 'error.internal'): string {
  const t = i18n.global.t;
  // An API error or a socket command's (stores/live.ts, not imported: the join page loads no socket).
  if (err instanceof Error && 'code' in err && 'detail' in err) {
    const { code } = err as { code: string };
    const { reason, params } = (err.detail ?? {}) as { reason?: string; params?: ErrorParams };
    if (reason && known(`error.${reason}`)) return t(`error.${reason}` as Key, params ?? {});
    if (known(`error.${code}`)) return t(`error.${code}` as Key);
  }
  return t(fallbackKey);
}

/** A rejected field in the participant's language (`field.<code>` with its limits), `undefined` when the field is fine. */
export function fieldText(err: unknown, field: string): string | undefined {
  if (!(err instanceof ClientError)) return undefined;
  const issue: FieldIssue | undefined = err.detail.fieldIssues?.[field];
  if (!issue) return err.fields[field] === undefined ? undefined : i18n.global.t('error.validation_failed');
  const params = issue.params ?? {};
  const limit = Number(params.max ?? params.min ?? 0);
  // "At least 1 character" is a field left empty.
  const key = issue.code === 'too_small' && limit <= 1 ? 'field.required' : `field.${issue.code}`;
  return known(key) ? i18n.global.t(key as Key, params, limit) : i18n.global.t('error.validation_failed');
}
