import type { ScreenState } from '../../../shared/schemas/live';

/** Which projector view a page belongs to: the current item, with or without its results. */
export function pagesKey(state: ScreenState | null): string {
  return `${state?.item?.id ?? ''}:${state?.revealed ? 'results' : 'live'}`;
}
