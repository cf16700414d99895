import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { Announcer, type CairnIo } from '../../server/common/announcer';

/** What a socket.io server was asked to send: rooms, rooms left out, event and payload. */
interface Sent {
  to: string[];
  except: string[];
  event: string;
  payload: unknown;
}

/** A stand-in for socket.io's broadcast calls that records them, with the rooms that have local sockets. */
function recordingIo(localRooms: Record<string, number> = {}): { io: CairnIo; sent: Sent[] } {
  const sent: Sent[] = [];
  const op = (to: string[], except: string[]) => ({
    except: (more: string | string[]) => op(to, [...except, ...(typeof more === 'string' ? [more] : more)]),
    emit: (event: string, payload: unknown) => sent.push({ to, except, event, payload }) > 0,
  });
  const rooms = new Map(Object.entries(localRooms).map(([room, n]) => [room, new Set(Array.from({ length: n }, (_, i) => `s${i}`))]));
  const io = {
    to: (r: string | string[]) => op(typeof r === 'string' ? [r] : r, []),
    sockets: { adapter: { rooms } },
  };
  return { io: io as unknown as CairnIo, sent };
}

const logger = { error: vi.fn() };

// Cairn's own rules for broadcasts (no outside reference): the timings below are the announcer's contract.
describe('the announcer', () => {
  beforeEach(() => {
    vi.useFakeTimers();
    logger.error.mockClear();
  });
  afterEach(() => {
    vi.useRealTimers();
  });

  it('sends a typed event to rooms, leaving out the sockets asked for', () => {
    const { io, sent } = recordingIo();
    const a = new Announcer(logger);
    a.announce('session:s1', 'rounds:updated', { itemId: 'i1' } as never);
    expect(sent).toHaveLength(0); // not attached yet: nothing goes out
    a.attach(io, { shared: false });
    a.announce(['facilitators:s1', 'screens:s1'], 'activity:changed', { itemId: 'i1' });
    a.announce('participant:p1', 'session:messaged', { id: 'm', text: 'hi', sentAt: 1 }, { except: 'socket-a' });
    expect(sent).toEqual([
      { to: ['facilitators:s1', 'screens:s1'], except: [], event: 'activity:changed', payload: { itemId: 'i1' } },
      { to: ['participant:p1'], except: ['socket-a'], event: 'session:messaged', payload: { id: 'm', text: 'hi', sentAt: 1 } },
    ]);
  });

  it('runs at once after a quiet spell, then at most once every everyMs, the latest call winning', async () => {
    const { io } = recordingIo();
    const a = new Announcer(logger);
    a.attach(io, { shared: false });
    const runs: number[] = [];
    const call = (n: number) => a.soon('tally:s1', () => void runs.push(n), { everyMs: 200, what: 'the tallies' });
    call(1);
    await vi.advanceTimersByTimeAsync(0);
    expect(runs).toEqual([1]);
    call(2);
    call(3);
    call(4);
    await vi.advanceTimersByTimeAsync(199);
    expect(runs).toEqual([1]);
    await vi.advanceTimersByTimeAsync(1);
    expect(runs).toEqual([1, 4]);
    // A quiet spell longer than everyMs: the next goes at once again.
    await vi.advanceTimersByTimeAsync(500);
    call(5);
    await vi.advanceTimersByTimeAsync(0);
    expect(runs).toEqual([1, 4, 5]);
  });

  it('waits afterMs before the first run, gathering what comes meanwhile; keys do not wait for each other', async () => {
    const { io } = recordingIo();
    const a = new Announcer(logger);
    a.attach(io, { shared: false });
    const runs: string[] = [];
    a.soon('a', () => void runs.push('a1'), { afterMs: 250, what: 'a' });
    await vi.advanceTimersByTimeAsync(100);
    a.soon('a', () => void runs.push('a2'), { afterMs: 250, what: 'a' });
    a.soon('b', () => void runs.push('b1'), { afterMs: 0, what: 'b' });
    await vi.advanceTimersByTimeAsync(0);
    expect(runs).toEqual(['b1']);
    await vi.advanceTimersByTimeAsync(150);
    expect(runs).toEqual(['b1', 'a2']);
  });

  it('merges the rooms of coalesced announcements into one send with the latest payload', async () => {
    const { io, sent } = recordingIo();
    const a = new Announcer(logger);
    a.attach(io, { shared: false });
    a.announceSoon('board:i1', ['facilitators:s1', 'screens:s1'], 'activity:changed', { itemId: 'i1' }, { afterMs: 250, what: 'a board change' });
    a.announceSoon('board:i1', ['screens:s1', 'team:t1'], 'activity:changed', { itemId: 'i1' }, { afterMs: 250, what: 'a board change' });
    a.announceSoon('board:i2', 'facilitators:s1', 'activity:changed', { itemId: 'i2' }, { afterMs: 250, what: 'a board change' });
    await vi.advanceTimersByTimeAsync(249);
    expect(sent).toHaveLength(0);
    await vi.advanceTimersByTimeAsync(1);
    expect(sent).toEqual([
      { to: ['facilitators:s1', 'screens:s1', 'team:t1'], except: [], event: 'activity:changed', payload: { itemId: 'i1' } },
      { to: ['facilitators:s1'], except: [], event: 'activity:changed', payload: { itemId: 'i2' } },
    ]);
  });

  it('sends what waits under a prefix at once when flushed, and leaves the other keys waiting', async () => {
    const { io, sent } = recordingIo();
    const a = new Announcer(logger);
    a.attach(io, { shared: false });
    a.announceSoon('board:i1', 'screens:s1', 'activity:changed', { itemId: 'i1' }, { afterMs: 250, what: 'a board change' });
    const runs: number[] = [];
    a.soon('tick:s1', () => void runs.push(1), { afterMs: 250, what: 'who is in the room' });
    a.flush('board:');
    await vi.advanceTimersByTimeAsync(0);
    expect(sent).toHaveLength(1);
    expect(runs).toEqual([]);
    await vi.advanceTimersByTimeAsync(250);
    expect(runs).toEqual([1]);
    expect(sent).toHaveLength(1);
  });

  it('logs a failing run, and after close runs nothing, sends nothing and logs nothing', async () => {
    const { io, sent } = recordingIo();
    const a = new Announcer(logger);
    a.attach(io, { shared: false });
    a.soon('x', () => Promise.reject(new Error('boom')), { what: 'the tallies' });
    await vi.advanceTimersByTimeAsync(0);
    expect(logger.error).toHaveBeenCalledWith(expect.objectContaining({ err: expect.any(Error) }), 'could not announce the tallies');
    const runs: number[] = [];
    a.soon('y', () => void runs.push(1), { afterMs: 100, what: 'y' });
    a.close();
    a.soon('z', () => void runs.push(2), { what: 'z' });
    a.announce('session:s1', 'activity:changed', { itemId: 'i1' });
    await vi.advanceTimersByTimeAsync(1000);
    expect(runs).toEqual([]);
    expect(sent).toHaveLength(0);
    expect(a.isClosed).toBe(true);
  });

  it('skips a room without local listeners in one process, never while broadcasts are shared with other processes', () => {
    const one = new Announcer(logger);
    one.attach(recordingIo({ 'facilitators:s1': 1, 'participant:p1': 1 }).io, { shared: false });
    expect(one.listening('facilitators:s1')).toBe(true);
    expect(one.listening('screens:s1')).toBe(false);
    // A phone's only socket, which sent the change itself, is nobody else to tell.
    expect(one.listening('participant:p1', 's0')).toBe(false);
    expect(one.listening('participant:p1', 'another-socket')).toBe(true);
    const several = new Announcer(logger);
    several.attach(recordingIo({ 'facilitators:s1': 1 }).io, { shared: true });
    expect(several.listening('screens:s1')).toBe(true);
    expect(several.listening('participant:p1', 's0')).toBe(true);
    several.close();
    expect(several.listening('screens:s1')).toBe(false);
  });
});
