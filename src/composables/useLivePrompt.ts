import { computed, type ComputedRef } from 'vue';
import { useLiveStore } from '../stores/live';
import { useVotingStore } from '../stores/voting';
import { fillDots } from '../../shared/words';

/**
 * The current item's prompt as the screens show it: a dot vote's prompt names the vote's own budget
 * of dots (the vote's rules once set up, else the item's settings), whatever number it was written with.
 */
export function useLivePrompt(): ComputedRef<string> {
  const live = useLiveStore();
  const voting = useVotingStore();
  return computed(() => {
    const item = live.state?.item;
    if (!item) return '';
    if (item.type !== 'dot_vote') return item.prompt;
    const vote = voting.vote?.itemId === item.id ? voting.vote : null;
    return fillDots(item.prompt, vote?.rules.dotsPerVoter ?? item.settings.dotsPerVoter ?? null);
  });
}
