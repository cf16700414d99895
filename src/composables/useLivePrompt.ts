import { computed, type ComputedRef } from 'vue';
import { useLiveStore } from '../stores/live';
import { useVotingStore } from '../stores/voting';
import { showPrompt } from '../../shared/templates';

/**
 * The current item's prompt as the screens show it: a dot vote's prompt names the vote's own budget
 * of dots (the vote's rules once set up, else the item's settings), whatever number it was written with,
 * and a sketching item's prompt its number of sketches.
 */
export function useLivePrompt(): ComputedRef<string> {
  const live = useLiveStore();
  const voting = useVotingStore();
  return computed(() => {
    const item = live.state?.item;
    if (!item) return '';
    const vote = voting.vote?.itemId === item.id ? voting.vote : null;
    return showPrompt(item, vote?.rules.dotsPerVoter);
  });
}
