import { problemText } from '../../i18n/problems';
import { i18n } from '../../i18n';
import { computed, ref, shallowRef, watch, type Ref } from 'vue';
import type { ActivityBoard, NoteView } from '../../../shared/schemas/activities';
import type { LiveItem } from '../../../shared/schemas/live';
import type { ActivityChannel } from './useActivityChannel';

/** How long to wait after a change before reading the board again, so a burst of changes costs one read. */
const RELOAD_DELAY_MS = 120;

/** A board kept up to date, and how to read it again at once. */
export interface LiveBoard {
  board: Ref<ActivityBoard | null>;
  /** Why the last read failed, in the facilitator's words (only the console shows it). */
  error: Readonly<Ref<string | null>>;
  reload(): Promise<void>;
}

/**
 * The current item's board as this screen sees it (`notes:list` on the console, `activity:board`
 * elsewhere), read again whenever the server says it changed, teams change or the socket comes back;
 * teammates' notes pushed to a phone are added as they come.
 */
export function useActivityBoard(channel: ActivityChannel, item: () => LiveItem, source: 'activity:board' | 'notes:list'): LiveBoard {
  const board = ref<ActivityBoard | null>(null);
  const failure = shallowRef<unknown>(null);
  const error = computed(() => (failure.value === null ? null : problemText(failure.value, i18n.global.t('liveActivity.loadFailed'))));
  let asked = 0;
  let timer: ReturnType<typeof setTimeout> | undefined;

  async function reload(): Promise<void> {
    clearTimeout(timer);
    const itemId = item().id;
    const mine = ++asked;
    try {
      const next = await channel.request(source, { itemId });
      // Only the newest answer for the item still shown counts.
      if (mine === asked && item().id === itemId) {
        board.value = next;
        failure.value = null;
      }
    } catch (err) {
      if (mine === asked) failure.value = err;
    }
  }
  const soon = () => {
    clearTimeout(timer);
    timer = setTimeout(() => void reload(), RELOAD_DELAY_MS);
  };

  channel.onReady(() => void reload());
  channel.on('activity:changed', (c) => {
    if (c.itemId === item().id) soon();
  });
  channel.on('teams:updated', soon);
  channel.on('notes:added', (note: NoteView) => {
    const b = board.value;
    if (!b || note.itemId !== b.itemId || b.notes.some((n) => n.id === note.id)) return;
    board.value = { ...b, notes: [...b.notes, note] };
  });
  watch(
    () => item().id,
    () => {
      board.value = null;
      void reload();
    },
  );
  return { board, error, reload };
}
