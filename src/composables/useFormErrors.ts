import { ClientError } from '../api/errors';
import { ref } from 'vue';
import { errorText, fieldText } from '../i18n/errors';
import { i18n } from '../i18n';
import { problemFields, problemText } from '../i18n/problems';

/**
 * Keeps a form's overall message and per-field messages from a failed API call, in the screen's language: a
 * facilitator's screen from the facilitator's catalogs (src/i18n/problems.ts); with `translate`, a participant's
 * screen from the participant's catalogs (src/i18n/errors.ts).
 * @example const { message, fields, run } = useFormErrors(); await run(() => api.save(form))
 */
export function useFormErrors(options: { translate?: boolean } = {}) {
  const message = ref<string | null>(null);
  const fields = ref<Record<string, string>>({});
  const busy = ref(false);

  /** Runs a call, clearing old messages first and keeping the new ones on failure; resolves to whether it worked. */
  async function run(call: () => Promise<unknown>): Promise<boolean> {
    message.value = null;
    fields.value = {};
    busy.value = true;
    try {
      await call();
      return true;
    } catch (err) {
      if (err instanceof ClientError && options.translate) {
        fields.value = Object.fromEntries(Object.keys(err.fields).map((f) => [f, fieldText(err, f) ?? '']));
        message.value = Object.keys(err.fields).length ? null : errorText(err);
      } else if (options.translate) {
        message.value = errorText(err);
      } else {
        // The facilitator's screens: the server's reason and each field's issue, from the facilitator's catalogs.
        message.value = problemText(err, i18n.global.t('problemCode.internal'));
        fields.value = problemFields(err);
      }
      return false;
    } finally {
      busy.value = false;
    }
  }

  return { message, fields, busy, run };
}
