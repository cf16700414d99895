import { getCurrentInstance, inject, onBeforeUnmount, provide, ref, watch, type InjectionKey, type Ref } from 'vue';
import type { Command, CommandAnswer, CommandArgs, ServerToClientEvents } from '../../../shared/events';
import type { CairnSocket } from '../../socket/client';
import { useLiveStore } from '../../stores/live';
import { photoObjectUrl, type PhotoToken } from '../../api/uploads';

/** Which screen an activity view runs on. */
export type ActivityScreen = 'phone' | 'console' | 'projector';

/** The activity views' own connection to the live session: commands, broadcasts and photos. */
export interface ActivityChannel {
  screen: ActivityScreen;
  connected: Ref<boolean>;
  /** Sends a command and resolves with its data, or rejects with the one ClientError (src/api/errors.ts). */
  request<E extends Command>(event: E, ...args: CommandArgs<E>): Promise<CommandAnswer<E>>;
  /** Listens to a broadcast until the component that asked is unmounted. */
  on<E extends keyof ServerToClientEvents>(event: E, listener: ServerToClientEvents[E]): void;
  /** Runs now if connected, and after every reconnection, until the component that asked is unmounted. */
  onReady(listener: () => void): void;
  /** An object URL of a photo (cached for the view's life); `null` when it cannot be shown. */
  photoUrl(photoId: string, size: 'thumb' | 'full', blurred: boolean): Promise<string | null>;
}

const KEY: InjectionKey<ActivityChannel> = Symbol('activity-channel');

/** How the channel finds its token and session. */
export interface ChannelOptions {
  screen: ActivityScreen;
  sessionId: () => string | null;
  workshopId: () => string | null;
  /** The token to connect with: a participant's, a projector's display token, or an account's access token. */
  token: () => string | null;
  /** Accounts attach to the session with `session:watch`; phones and display tokens are attached on connect. */
  watches: boolean;
}

/**
 * Gives the activity sub-components the screen's connection to the live session (the live store's
 * socket): commands, broadcasts scoped to the view's life, and photos.
 */
export function provideActivityChannel(options: ChannelOptions): ActivityChannel {
  // The channel lives as long as the screen's top activity view, not any one child.
  const connected = ref(false);
  const readyListeners = new Set<() => void>();
  const photos = new Map<string, Promise<string | null>>();

  // The screen's one connection to the session is the live store's; the page opened it before this view.
  const live = useLiveStore();
  const s = live.socket as CairnSocket;
  const untyped = s as unknown as { on(e: string, fn: unknown): void; off(e: string, fn: unknown): void };
  // Children mount and unmount with each agenda item; their listeners go with them.
  const whileMounted = (remove: () => void) => {
    if (getCurrentInstance()) onBeforeUnmount(remove);
  };
  const ready = () => {
    connected.value = true;
    for (const l of readyListeners) l();
  };
  // Every time the live store has attached the socket to the session (after each reconnection).
  const stopAttached = watch(
    () => live.attached,
    () => ready(),
  );
  const onDisconnect = () => (connected.value = false);
  s.on('disconnect', onDisconnect);
  if (live.connected && live.attached > 0) connected.value = true;

  const channel: ActivityChannel = {
    screen: options.screen,
    connected,
    request(event, ...args) {
      return live.ask(event, ...args);
    },
    on(event, listener) {
      untyped.on(event, listener);
      whileMounted(() => untyped.off(event, listener));
    },
    onReady(listener) {
      readyListeners.add(listener);
      whileMounted(() => readyListeners.delete(listener));
      if (connected.value) listener();
    },
    photoUrl(photoId, size, blurred) {
      // A photo that becomes blurred (or clear) is another picture: the flag is part of the key.
      const key = `${photoId}|${size}|${blurred}`;
      let url = photos.get(key);
      if (!url) {
        const token: PhotoToken = { token: options.token() ?? '', workshopId: options.screen === 'phone' || !options.watches ? null : options.workshopId() };
        url = photoObjectUrl(photoId, size, token).catch(() => null);
        photos.set(key, url);
      }
      return url;
    },
  };
  provide(KEY, channel);
  onBeforeUnmount(() => {
    stopAttached();
    s.off('disconnect', onDisconnect);
    for (const url of photos.values()) void url.then((u) => u && URL.revokeObjectURL(u));
  });
  return channel;
}

/** The activity channel provided by the screen's top activity view. */
export function useActivityChannel(): ActivityChannel {
  const channel = inject(KEY);
  if (!channel) throw new Error('useActivityChannel needs provideActivityChannel in a parent component');
  return channel;
}
