import { onBeforeUnmount, ref } from 'vue';

/**
 * A clock that ticks every `everyMs`, read from the given source (e.g. the server-time estimate).
 * @example const now = useNow(() => live.serverNow(), 1000)
 */
export function useNow(source: () => number = Date.now, everyMs = 1000) {
  const now = ref(source());
  const id = setInterval(() => (now.value = source()), everyMs);
  onBeforeUnmount(() => clearInterval(id));
  return now;
}
