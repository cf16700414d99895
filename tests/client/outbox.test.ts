import { describe, expect, it } from 'vitest';
import { ClientError } from '../../src/api/errors';
import type { CommandAnswer, CommandPayload } from '../../shared/events';
import { MemoryOutboxStorage, Outbox, type OutboxCommand, type OutboxItem, type OutboxTransport, type PhotoFields } from '../../src/socket/outbox';

/**
 * A fake socket and server: it keeps the first of each client id (as Cairn's server does for notes,
 * ballots and photos), and can be disconnected, made to lose its answers after storing, or to refuse.
 */
class FakeServer implements OutboxTransport {
  up = true;
  loseAnswers = 0;
  refuse: string | null = null;
  /** Every try that reached the server, in order: [event, clientId]. */
  tries: [string, string][] = [];
  /** What the server stored, by client id (once each). */
  stored = new Map<string, unknown>();

  connected(): boolean {
    return this.up;
  }

  private receive(event: string, clientId: string, what: unknown): unknown {
    if (!this.up) throw new ClientError('network', 'Not connected');
    this.tries.push([event, clientId]);
    if (this.refuse) throw new ClientError('session_ended', this.refuse);
    if (!this.stored.has(clientId)) this.stored.set(clientId, what);
    if (this.loseAnswers > 0) {
      this.loseAnswers -= 1;
      throw new ClientError('timeout', 'The server did not answer in time');
    }
    return { stored: clientId };
  }

  async ask<E extends OutboxCommand>(event: E, payload: CommandPayload<E>): Promise<CommandAnswer<E>> {
    // The fake answers every command alike; the outbox only passes the answer on.
    return this.receive(event, payload.clientId, payload) as CommandAnswer<E>;
  }

  async upload(fields: PhotoFields, file: Blob, fileName: string): Promise<unknown> {
    return this.receive('photo', fields.clientId, { fields, bytes: await file.text(), fileName });
  }
}

function note(clientId: string, text = 'Docks are full by 9'): OutboxItem {
  return { kind: 'note', clientId, payload: { clientId, itemId: 'item-1', kind: 'note', text } };
}

function ballot(clientId: string): OutboxItem {
  return { kind: 'ballot', clientId, event: 'vote:dot', payload: { clientId, optionId: 'o1', criterionId: 'c1', delta: 1 } };
}

function photo(clientId: string): OutboxItem {
  return { kind: 'photo', clientId, fileName: 'sheet.png', fields: { itemId: 'item-1', clientId, caption: 'Eight sketches', showsPeople: false, peopleConsent: false } };
}

function makeOutbox(storage: MemoryOutboxStorage, server: FakeServer) {
  const seen = { waiting: [] as number[], refused: [] as string[] };
  const outbox = new Outbox(
    storage,
    server,
    { changed: (items) => seen.waiting.push(items.length), refused: (_item, err) => seen.refused.push(err.message) },
    10,
  );
  return { outbox, seen };
}

const settle = () => new Promise((r) => setTimeout(r, 40));

describe('the phone outbox', () => {
  it('sends notes, ballots and photos in the order they were made, each once', async () => {
    const server = new FakeServer();
    const { outbox } = makeOutbox(new MemoryOutboxStorage(), server);
    await outbox.open('session:s1');
    await outbox.add(note('n1'));
    const dot = outbox.addAndWait(ballot('b1'));
    await outbox.add(photo('p1'), new Blob(['png-bytes']));
    expect(await dot).toEqual({ stored: 'b1' });
    await settle();
    expect(server.tries).toEqual([
      ['submission:create', 'n1'],
      ['vote:dot', 'b1'],
      ['photo', 'p1'],
    ]);
    expect(outbox.items).toEqual([]);
    expect(server.stored.get('p1')).toMatchObject({ bytes: 'png-bytes', fileName: 'sheet.png' });
  });

  it('keeps what waits while the socket is down, counts it, and sends it with the same ids on reconnect', async () => {
    const server = new FakeServer();
    server.up = false;
    const { outbox, seen } = makeOutbox(new MemoryOutboxStorage(), server);
    await outbox.open('session:s1');
    await outbox.add(note('n1'));
    await outbox.add(note('n2'));
    await settle();
    expect(server.tries).toEqual([]);
    expect(outbox.items.map((i) => i.clientId)).toEqual(['n1', 'n2']);
    expect(seen.waiting.at(-1)).toBe(2); // what the phone shows as "2 waiting"
    server.up = true;
    await outbox.flush();
    expect(server.tries.map(([, id]) => id)).toEqual(['n1', 'n2']);
    expect(seen.waiting.at(-1)).toBe(0);
  });

  it('resends after a lost answer with the same client id, and the server stores it once', async () => {
    const server = new FakeServer();
    server.loseAnswers = 2;
    const { outbox } = makeOutbox(new MemoryOutboxStorage(), server);
    await outbox.open('session:s1');
    const answer = outbox.addAndWait(ballot('b1'));
    expect(await answer).toEqual({ stored: 'b1' });
    expect(server.tries).toEqual([
      ['vote:dot', 'b1'],
      ['vote:dot', 'b1'],
      ['vote:dot', 'b1'],
    ]);
    expect(server.stored.size).toBe(1);
    expect(outbox.stalled).toBe(false);
  });

  it('survives a reload: a new outbox over the same store sends what waited, a photo with its bytes', async () => {
    const storage = new MemoryOutboxStorage();
    const server = new FakeServer();
    server.up = false;
    const before = makeOutbox(storage, server).outbox;
    await before.open('session:s1');
    await before.add(note('n1'));
    await before.add(photo('p1'), new Blob(['png-bytes']));
    // The page reloads: the first outbox is gone, a new one opens the same session's list.
    const after = makeOutbox(storage, server);
    await after.outbox.open('session:s1');
    expect(after.outbox.items.map((i) => i.clientId)).toEqual(['n1', 'p1']);
    server.up = true;
    await after.outbox.flush();
    expect(server.tries).toEqual([
      ['submission:create', 'n1'],
      ['photo', 'p1'],
    ]);
    expect(server.stored.get('p1')).toMatchObject({ bytes: 'png-bytes' });
    expect(storage.files.size).toBe(0);
    expect(await storage.load('session:s1')).toEqual([]);
  });

  it('drops what the server refuses and says why: to the screen that waits, else to the hook', async () => {
    const server = new FakeServer();
    server.refuse = 'The live session has ended';
    const { outbox, seen } = makeOutbox(new MemoryOutboxStorage(), server);
    await outbox.open('session:s1');
    await expect(outbox.addAndWait(ballot('b1'))).rejects.toMatchObject({ code: 'session_ended' });
    await outbox.add(note('n1'));
    await settle();
    expect(seen.refused).toEqual(['The live session has ended']);
    expect(outbox.items).toEqual([]);
  });

  it('keeps one session apart from another', async () => {
    const storage = new MemoryOutboxStorage();
    const server = new FakeServer();
    server.up = false;
    const { outbox } = makeOutbox(storage, server);
    await outbox.open('session:s1');
    await outbox.add(note('n1'));
    await outbox.open('session:s2');
    expect(outbox.items).toEqual([]);
    await outbox.open('session:s1');
    expect(outbox.items.map((i) => i.clientId)).toEqual(['n1']);
  });

  it('tells a screen still waiting when the phone leaves the session', async () => {
    const server = new FakeServer();
    server.up = false;
    const { outbox } = makeOutbox(new MemoryOutboxStorage(), server);
    await outbox.open('session:s1');
    const answer = outbox.addAndWait(ballot('b1'));
    await settle();
    outbox.close();
    await expect(answer).rejects.toBeInstanceOf(ClientError);
  });
});
