import { ClientError } from '../api/errors';
import { ref } from 'vue';
import { errorText, fieldText } from '../i18n/errors';

/**
 * Keeps a form's overall message and per-field messages from a failed API call; with `translate`, in the
 * participant's language from the catalogs (src/i18n/errors.ts) rather than the server's English.
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
      } else if (err instanceof ClientError) {
        message.value = err.message;
        fields.value = err.fields;
      } else if (options.translate) {
        message.value = errorText(err);
      } else {
        message.value = 'Something went wrong; try again';
      }
      return false;
    } finally {
      busy.value = false;
    }
  }

  return { message, fields, busy, run };
}
