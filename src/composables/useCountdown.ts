import { computed } from 'vue';
import { formatCountdown, remainingMs } from '../../shared/clock';
import type { TimerState } from '../../shared/schemas/live';
import { useNow } from './useNow';

/**
 * A ticking countdown of the server-owned timer: remaining time from the server's clock estimate
 * (offset plus a monotonic clock), so every screen shows the same second.
 * @example const { label, remaining } = useCountdown(() => live.state?.timer ?? null, live.serverNow)
 */
export function useCountdown(timer: () => TimerState | null, serverNow: () => number) {
  const now = useNow(serverNow, 200);
  const remaining = computed(() => {
    const t = timer();
    return t ? remainingMs(t, now.value) : 0;
  });
  const label = computed(() => formatCountdown(remaining.value));
  return { remaining, label };
}
