import { ClientError } from '../api/errors';
import { ref } from 'vue';

/**
 * Keeps a form's overall message and per-field messages from a failed API call.
 * @example const { message, fields, run } = useFormErrors(); await run(() => api.save(form))
 */
export function useFormErrors() {
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
      if (err instanceof ClientError) {
        message.value = err.message;
        fields.value = err.fields;
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
