import { computed, ref, watch, type ComputedRef } from 'vue';
import { useOutboxStore } from '../stores/outbox';
import { newId } from '../socket/ids';

/**
 * What one composer sent on the current item: a note or photo counts as sent once it has left the
 * phone's outbox, so "sent" and "waiting" always add up to what was made.
 * @example const { sent, track } = useSentCount(() => props.item.id); await live.submit({ ...input, clientId: track() });
 */
export function useSentCount(itemId: () => string): { sent: ComputedRef<number>; waiting: ComputedRef<number>; track: () => string } {
  const outbox = useOutboxStore();
  const ids = ref<string[]>([]);
  watch(itemId, () => (ids.value = []));
  const sent = computed(() => ids.value.filter((id) => !outbox.isWaiting(id)).length);
  const waiting = computed(() => ids.value.length - sent.value);
  /** A fresh client id for the next submission, counted from now on. */
  function track(): string {
    const id = newId();
    ids.value = [...ids.value, id];
    return id;
  }
  return { sent, waiting, track };
}
