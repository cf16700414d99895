import { ref, watch, type Ref } from 'vue';
import { ROUND_TYPES } from '../../../shared/activities';
import type { RoundView } from '../../../shared/schemas/activities';
import type { LiveItem } from '../../../shared/schemas/live';
import type { ActivityChannel } from './useActivityChannel';

/**
 * The current round of an item run in rounds (rotating pairs, test visits), kept up to date from
 * `rounds:updated`, and read again when teams or the room change; `null` for other activities.
 */
export function useRound(channel: ActivityChannel, item: () => LiveItem): { round: Ref<RoundView | null>; reload(): Promise<void> } {
  const round = ref<RoundView | null>(null);
  let asked = 0;

  async function reload(): Promise<void> {
    const it = item();
    if (!ROUND_TYPES.has(it.type)) {
      round.value = null;
      return;
    }
    const mine = ++asked;
    const next = await channel.request('rounds:get', { itemId: it.id }).catch(() => null);
    if (mine === asked && next && item().id === it.id) round.value = next;
  }

  channel.onReady(() => void reload());
  channel.on('rounds:updated', (r) => {
    if (r.itemId === item().id) round.value = r;
  });
  channel.on('teams:updated', () => void reload());
  // The console hears who joins: newcomers to pair appear at once.
  channel.on('participants:updated', () => void reload());
  watch(
    () => item().id,
    () => {
      round.value = null;
      void reload();
    },
  );
  return { round, reload };
}
