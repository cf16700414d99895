import type { CommandAnswer, CommandPayload } from '../../shared/events';
import { ClientError } from '../api/errors';

/** The socket commands the outbox sends. */
export type OutboxCommand = 'submission:create' | 'vote:dot' | 'vote:rank';

/** A photo's fields besides its bytes (the bytes wait in the outbox's file store under the client id). */
export interface PhotoFields {
  itemId: string;
  clientId: string;
  caption: string;
  showsPeople: boolean;
  peopleConsent: boolean;
}

/**
 * One thing a phone sends that must arrive exactly once: a note (socket `submission:create`), a
 * ballot (socket `vote:dot` / `vote:rank`) or a photo (HTTP upload). Its `clientId` goes with every
 * try, and the server keeps the first of each id, so sending it again after a lost answer, a
 * reconnect or a reload stores it once.
 */
export type OutboxItem =
  | { kind: 'note'; clientId: string; payload: CommandPayload<'submission:create'> }
  | { kind: 'ballot'; clientId: string; event: 'vote:dot'; payload: CommandPayload<'vote:dot'> }
  | { kind: 'ballot'; clientId: string; event: 'vote:rank'; payload: CommandPayload<'vote:rank'> }
  | { kind: 'photo'; clientId: string; fields: PhotoFields; fileName: string };

/** Where the outbox keeps its list (per session) and photos' bytes (per client id) across reloads. */
export interface OutboxStorage {
  /** The list kept under a key (empty when none). */
  load(key: string): Promise<OutboxItem[]>;
  /** Keeps the list under a key. */
  save(key: string, items: OutboxItem[]): Promise<void>;
  /** Keeps a photo's bytes. */
  putFile(clientId: string, file: Blob): Promise<void>;
  /** A photo's kept bytes, if any. */
  getFile(clientId: string): Promise<Blob | undefined>;
  /** Forgets a photo's bytes. */
  deleteFile(clientId: string): Promise<void>;
}

/** How the outbox reaches the server: socket commands and the photo upload, each throwing a {@link ClientError}. */
export interface OutboxTransport {
  /** Whether the connection is up now (nothing is tried while it is down). */
  connected(): boolean;
  /** Sends a socket command and resolves to its answer's data. */
  ask<E extends OutboxCommand>(event: E, payload: CommandPayload<E>): Promise<CommandAnswer<E>>;
  /** Uploads a photo and resolves to the server's answer. */
  upload(fields: PhotoFields, file: Blob, fileName: string): Promise<unknown>;
}

/** What the outbox tells its owner. */
export interface OutboxHooks {
  /** The list changed (added, sent, dropped, loaded). */
  changed(items: readonly OutboxItem[]): void;
  /** The server has an item (it answered); screens showing what was sent read it again. */
  sent?(item: OutboxItem, answer: unknown): void;
  /** The server refused an item nobody is waiting for (one queued before a reload, a note, a photo). */
  refused(item: OutboxItem, error: ClientError): void;
}

/** An outbox's list kept in memory only (tests, or a browser without IndexedDB). */
export class MemoryOutboxStorage implements OutboxStorage {
  lists = new Map<string, OutboxItem[]>();
  files = new Map<string, Blob>();
  /** @inheritdoc */
  async load(key: string): Promise<OutboxItem[]> {
    return structuredClone(this.lists.get(key) ?? []);
  }
  /** @inheritdoc */
  async save(key: string, items: OutboxItem[]): Promise<void> {
    this.lists.set(key, structuredClone(items));
  }
  /** @inheritdoc */
  async putFile(clientId: string, file: Blob): Promise<void> {
    this.files.set(clientId, file);
  }
  /** @inheritdoc */
  async getFile(clientId: string): Promise<Blob | undefined> {
    return this.files.get(clientId);
  }
  /** @inheritdoc */
  async deleteFile(clientId: string): Promise<void> {
    this.files.delete(clientId);
  }
}

/** Sends one item the way its kind goes: notes and ballots over the socket, photos over HTTP. */
function deliver(transport: OutboxTransport, item: OutboxItem, file: Blob | undefined): Promise<unknown> {
  if (item.kind === 'note') return transport.ask('submission:create', item.payload);
  if (item.kind === 'ballot') return item.event === 'vote:dot' ? transport.ask('vote:dot', item.payload) : transport.ask('vote:rank', item.payload);
  if (!file) return Promise.reject(new ClientError('bad_request', 'The photo was lost on this phone before it could be sent; take it again'));
  return transport.upload(item.fields, file, item.fileName);
}

/**
 * The phone's one outbox: notes, ballots and photos wait here, in the order they were made, kept
 * (with photos' bytes) so they survive a reload, and go one at a time whenever the connection is up.
 * A lost answer (`network`, `timeout`) keeps the item for the next try with the same client id; a
 * refusal drops it and says why. {@link Outbox.addAndWait} resolves to the server's answer, or rejects
 * with its refusal, for a screen that waits (a dot shows at once and is taken back if refused).
 */
export class Outbox {
  /** What waits to be sent, oldest first. */
  items: OutboxItem[] = [];
  /** The last try's answer was lost (no connection): what waits goes when the connection is back. */
  stalled = false;
  private key = '';
  private ready: Promise<void> = Promise.resolve();
  private flushing = false;
  private timer: ReturnType<typeof setTimeout> | null = null;
  private waiters = new Map<string, { resolve: (answer: unknown) => void; reject: (err: ClientError) => void }>();

  constructor(
    private storage: OutboxStorage,
    private transport: OutboxTransport,
    private hooks: OutboxHooks,
    /** How long after a lost answer the next try goes while the connection is still up. */
    private retryMs = 3000,
  ) {}

  /** Takes up the list kept for a key (one a live session), as it was left before a reload. */
  open(key: string): Promise<void> {
    this.close();
    this.key = key;
    this.ready = this.storage
      .load(key)
      .catch(() => [] as OutboxItem[])
      .then((kept) => {
        if (this.key !== key) return;
        // Anything added while the list was loading goes after what was kept.
        const fresh = this.items.filter((i) => !kept.some((k) => k.clientId === i.clientId));
        this.items = [...kept, ...fresh];
        this.hooks.changed(this.items);
      });
    return this.ready;
  }

  /** Lets go of the list (it stays kept); screens waiting for an answer hear that it will not come here. */
  close(): void {
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    for (const w of this.waiters.values()) w.reject(new ClientError('network', 'Left the session before this was sent'));
    this.waiters.clear();
    this.key = '';
    this.items = [];
    this.stalled = false;
    this.hooks.changed(this.items);
  }

  /**
   * Queues an item (and a photo's bytes), keeps it, and sends it as soon as it may. Resolves once it
   * is kept; a refusal goes to the `refused` hook. See {@link Outbox.addAndWait} for a screen that waits.
   */
  async add(item: OutboxItem, file?: Blob): Promise<void> {
    await this.queue(item, file, false);
  }

  /** Like {@link Outbox.add}, but resolves to the server's answer and rejects with its refusal (nothing goes to the hook). */
  async addAndWait(item: OutboxItem, file?: Blob): Promise<unknown> {
    return (await this.queue(item, file, true)).answer;
  }

  private async queue(item: OutboxItem, file: Blob | undefined, wait: boolean): Promise<{ answer?: Promise<unknown> }> {
    await this.ready;
    // A plain copy: what a screen hands over may be reactive, which the store cannot keep.
    item = JSON.parse(JSON.stringify(item)) as OutboxItem;
    const answer = wait ? new Promise<unknown>((resolve, reject) => this.waiters.set(item.clientId, { resolve, reject })) : undefined;
    // Bytes first: a list that names a photo always has its bytes kept.
    if (file) await this.storage.putFile(item.clientId, file).catch(() => this.memoryFiles.set(item.clientId, file));
    this.items = [...this.items, item];
    await this.persist();
    void this.flush();
    // Wrapped, so awaiting `queue` does not wait for the answer itself.
    return { answer };
  }

  /** Bytes kept in memory when the file store refused them (they then do not survive a reload). */
  private memoryFiles = new Map<string, Blob>();

  /** Sends what waits, in order, one at a time, while the connection is up. */
  async flush(): Promise<void> {
    await this.ready;
    if (this.flushing) return;
    this.flushing = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    try {
      while (this.items.length > 0 && this.transport.connected()) {
        const item = this.items[0]!;
        const file = item.kind === 'photo' ? (this.memoryFiles.get(item.clientId) ?? (await this.storage.getFile(item.clientId).catch(() => undefined))) : undefined;
        try {
          const answer = await deliver(this.transport, item, file);
          this.stalled = false;
          await this.remove(item);
          this.hooks.sent?.(item, answer);
          this.settle(item, (w) => w.resolve(answer));
        } catch (err) {
          const error = err instanceof ClientError ? err : new ClientError('internal', 'This could not be sent');
          if (error.lost) {
            this.stalled = true;
            this.hooks.changed(this.items);
            // Kept for the next try with the same client id; a reconnect also flushes at once.
            if (this.transport.connected()) this.timer = setTimeout(() => void this.flush(), this.retryMs);
            break;
          }
          this.stalled = false;
          await this.remove(item);
          if (!this.settle(item, (w) => w.reject(error))) this.hooks.refused(item, error);
        }
      }
    } finally {
      this.flushing = false;
    }
  }

  /** Tells the screen waiting for an item, if any; answers whether one was. */
  private settle(item: OutboxItem, tell: (w: { resolve: (answer: unknown) => void; reject: (err: ClientError) => void }) => void): boolean {
    const w = this.waiters.get(item.clientId);
    this.waiters.delete(item.clientId);
    if (w) tell(w);
    return !!w;
  }

  private async remove(item: OutboxItem): Promise<void> {
    this.items = this.items.filter((i) => i.clientId !== item.clientId);
    await this.persist();
    if (item.kind === 'photo') {
      this.memoryFiles.delete(item.clientId);
      await this.storage.deleteFile(item.clientId).catch(() => undefined);
    }
  }

  private async persist(): Promise<void> {
    this.hooks.changed(this.items);
    // A full or blocked store costs only the survival of a reload; the list in memory still goes.
    if (this.key) await this.storage.save(this.key, this.items).catch(() => undefined);
  }
}
