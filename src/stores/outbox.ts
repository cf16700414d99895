import { defineStore } from 'pinia';
import { computed, ref, shallowRef } from 'vue';
import type { SubmissionInput } from '../../shared/schemas/live';
import type { CommandAnswer, CommandPayload } from '../../shared/events';
import { uploadPhoto } from '../api/uploads';
import { ClientError } from '../api/errors';
import { errorText } from '../i18n/errors';
import { Outbox, type OutboxCommand, type OutboxItem, type PhotoFields } from '../socket/outbox';
import { browserOutboxStorage } from '../socket/outbox-storage';

/** How the live store lends the outbox its socket. */
export interface OutboxLink {
  /** Whether the socket is attached to the session now. */
  connected(): boolean;
  /** A socket command, answered or thrown as a client error. */
  ask<E extends OutboxCommand>(event: E, payload: CommandPayload<E>): Promise<CommandAnswer<E>>;
}

/**
 * The phone's one outbox (see `src/socket/outbox.ts`) as the screens use it: notes, ballots and
 * photos queue here, are kept in IndexedDB per session (photos' bytes too), and go with the same
 * client id until the server has them; `waiting` is the "n waiting" the phone shows.
 */
export const useOutboxStore = defineStore('outbox', () => {
  const items = shallowRef<readonly OutboxItem[]>([]);
  /** A try found no connection: what waits goes by itself when it is back. */
  const stalled = ref(false);
  /** Goes up each time the server has taken a note, ballot or photo (boards on screen read again). */
  const deliveries = ref(0);
  /** The last refusal nobody was waiting for (a note or photo the server would not take). */
  const rejected = ref<string | null>(null);
  let sessionId = '';
  let link: OutboxLink = { connected: () => false, ask: () => Promise.reject(new ClientError('network', 'Not connected')) };
  const outbox = new Outbox(
    browserOutboxStorage(),
    {
      connected: () => link.connected(),
      ask: (event, payload) => link.ask(event, payload),
      upload: (fields, file, fileName) => {
        const token = localStorage.getItem(`cairn.participant.${sessionId}`);
        if (!token) return Promise.reject(new ClientError('unauthenticated', 'Join the session again to add photos'));
        return uploadPhoto(token, fields, file, fileName);
      },
    },
    {
      changed: (list) => {
        items.value = [...list];
        stalled.value = outbox.stalled && list.length > 0;
      },
      sent: () => (deliveries.value += 1),
      // Said on the phone, in its participant's language.
      refused: (_item, err) => (rejected.value = errorText(err)),
    },
  );

  const waiting = computed(() => items.value.length);
  // Back online: what waits goes at once (the socket's reconnect flushes too).
  if (typeof window !== 'undefined') window.addEventListener('online', () => void outbox.flush());

  /** Takes up the session's kept outbox with the live store's socket, and sends what waits. */
  async function open(forSession: string, through: OutboxLink): Promise<void> {
    sessionId = forSession;
    link = through;
    rejected.value = null;
    await outbox.open(`session:${forSession}`);
    await adoptOlderNotes(forSession);
    void outbox.flush();
  }

  /** Notes an earlier version of Cairn queued in local storage go into the one outbox, once. */
  async function adoptOlderNotes(forSession: string): Promise<void> {
    const key = `cairn.outbox.${forSession}`;
    try {
      const older = JSON.parse(localStorage.getItem(key) ?? '[]') as SubmissionInput[];
      localStorage.removeItem(key);
      for (const payload of older) void outbox.add({ kind: 'note', clientId: payload.clientId, payload }).catch(() => undefined);
    } catch {
      // Nothing readable: nothing to adopt.
    }
  }

  /** Lets go of the session's outbox (it stays kept for a later visit). */
  function close(): void {
    sessionId = '';
    outbox.close();
    rejected.value = null;
  }

  /** Sends what waits now (the socket is back, the phone is online again). */
  function flush(): Promise<void> {
    return outbox.flush();
  }

  /**
   * Waits for what the server answers to an item nobody else waits for: a refusal shows in
   * `rejected`; a lost answer is no refusal (the item stays kept and goes later, even after a reload).
   */
  async function delivered(answer: Promise<unknown>): Promise<void> {
    try {
      await answer;
    } catch (err) {
      if (!(err instanceof ClientError && err.lost)) rejected.value = errorText(err);
    }
  }

  /** Queues a note; resolves once the server has it (or refused it: see `rejected`). */
  function note(payload: SubmissionInput): Promise<void> {
    return delivered(outbox.addAndWait({ kind: 'note', clientId: payload.clientId, payload }));
  }

  /** Queues a ballot command; resolves to the server's answer, rejects with its refusal. */
  function ballot<E extends 'vote:dot' | 'vote:rank'>(event: E, payload: CommandPayload<E>): Promise<CommandAnswer<E>> {
    const item = { kind: 'ballot', clientId: payload.clientId, event, payload } as OutboxItem;
    // The outbox hands back the server's answer to this command as it came.
    return outbox.addAndWait(item) as Promise<CommandAnswer<E>>;
  }

  /** Queues a photo with its bytes; resolves once the server has it (or refused it: see `rejected`). */
  function photo(fields: PhotoFields, file: Blob, fileName: string): Promise<void> {
    return delivered(outbox.addAndWait({ kind: 'photo', clientId: fields.clientId, fields, fileName }, file));
  }

  /** Whether an item with this client id still waits. */
  function isWaiting(clientId: string): boolean {
    return items.value.some((i) => i.clientId === clientId);
  }

  return { items, waiting, stalled, deliveries, rejected, open, close, flush, note, ballot, photo, isWaiting };
});
