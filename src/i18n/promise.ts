import { i18n } from './index';

/**
 * What a phone promises about personal data, in the participant's language, agreeing with the workshop's
 * retention setting: deleted a number of days after the session, or kept until the facilitator deletes it.
 */
export function retentionPromise(retentionDays: number | null): string {
  const t = i18n.global.t;
  if (retentionDays === null) return t('data.keep');
  if (retentionDays === 0) return t('data.deleteSoon');
  return t('data.deleteAfter', { days: retentionDays }, retentionDays);
}
