/**
 * One worker process of simulated phones for `npm run bench` (`--client-workers N` of them): joins its
 * share of the phones, times when an awaited change reaches each, and sends its phones' dots in the
 * burst. Talks to bench/run.ts over the IPC channel; every time it reports is `now()`, milliseconds on
 * the clock bench/run.ts calibrates against (see `clockOffset` there), so arrivals from several
 * processes are measured from one start.
 */
import http from 'node:http';
import { performance } from 'node:perf_hooks';
import { io as ioClient, type Socket } from 'socket.io-client';
import { OVERALL_CRITERION } from '../shared/tally';

/** Milliseconds since the epoch, sub-millisecond, comparable between processes on one machine. */
const now = () => performance.timeOrigin + performance.now();

type Request =
  | { id: number; type: 'clock' }
  | { id: number; type: 'join'; payload: { port: number; joinCode: string | null; indices: number[]; concurrency: number } }
  | { id: number; type: 'arm'; payload: { index?: number; version?: number } }
  | { id: number; type: 'arrivals' }
  | { id: number; type: 'burst'; payload: { optionIds: string[]; dotsEach: number; windowMs: number; startAt: number; prefix: string } }
  | { id: number; type: 'close' };

const phones: { index: number; socket: Socket }[] = [];
let armed: Promise<number[]> | null = null;
/** What the first phone received last, for the baseline to send a message of the same size. */
let lastPayload: unknown = null;

function reply(id: number, data: unknown): void {
  process.send?.({ id, data });
}

function connect(port: number, token?: string): Promise<Socket> {
  return new Promise((resolve, reject) => {
    const s = ioClient(`http://127.0.0.1:${port}`, {
      auth: token ? { token } : {},
      transports: ['websocket'],
      reconnection: false,
      forceNew: true,
      timeout: 60_000,
    });
    s.once('connect', () => resolve(s));
    s.once('connect_error', reject);
  });
}

async function ask<T>(s: Socket, event: string, payload: unknown = {}): Promise<T> {
  const answer = (await s.timeout(60_000).emitWithAck(event, payload)) as { data?: T; error?: { code: string; message: string } };
  if (answer.error) throw new Error(`${event}: ${answer.error.code} ${answer.error.message}`);
  return answer.data as T;
}

/**
 * Connections kept open between requests, as Node's `fetch` keeps them (and a phone's browser its own).
 * The join's request goes through node:http, not `fetch`: the simulated phones share the server's cores, and
 * `fetch` cost this worker about 0.6–0.9 ms more CPU per request (measured 2026-12-02: 2,000 POSTs of a join's
 * size against a local server, 25 at a time), CPU a real phone spends on its own processor, not the server's.
 */
const agent = new http.Agent({ keepAlive: true });

/** POSTs a JSON body and returns the answer's status and text. */
function post(port: number, path: string, body: string): Promise<{ status: number; text: string }> {
  return new Promise((resolve, reject) => {
    const req = http.request(
      { host: '127.0.0.1', port, path, method: 'POST', agent, headers: { 'Content-Type': 'application/json', 'Content-Length': Buffer.byteLength(body) } },
      (res) => {
        let text = '';
        res.setEncoding('utf8');
        res.on('data', (chunk: string) => (text += chunk));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, text }));
        res.on('error', reject);
      },
    );
    req.on('error', reject);
    req.end(body);
  });
}

/** Runs `work` over the items with at most `limit` at a time. */
async function pool<T>(items: T[], limit: number, work: (item: T) => Promise<void>): Promise<void> {
  let at = 0;
  await Promise.all(
    Array.from({ length: Math.min(limit, items.length) }, async () => {
      while (at < items.length) await work(items[at++]!);
    }),
  );
}

/** Joins the phones `indices`: Cairn's HTTP join, the socket and the first sync; or, bare, a connect and one acknowledged event. */
async function join({ port, joinCode, indices, concurrency }: { port: number; joinCode: string | null; indices: number[]; concurrency: number }) {
  const times: number[] = [];
  await pool(indices, concurrency, async (index) => {
    const t0 = now();
    let socket: Socket;
    if (joinCode) {
      const body = JSON.stringify({ displayName: `Rider ${index + 1}`, photoConsent: index % 3 !== 0, deviceId: `bench-${index}-${crypto.randomUUID()}` });
      const res = await post(port, `/api/join/${joinCode}`, body);
      if (res.status !== 200) throw new Error(`join ${index}: ${res.status} ${res.text}`);
      const { token } = JSON.parse(res.text) as { token: string };
      socket = await connect(port, token);
      await ask(socket, 'session:sync');
    } else {
      socket = await connect(port);
      await ask(socket, 'ping:ack');
    }
    times.push(now() - t0);
    phones.push({ index, socket });
  });
  return times;
}

/** Listens for the change every phone awaits (an item index, or the bare server's version) and keeps each arrival's time. */
function arm({ index, version }: { index?: number; version?: number }): void {
  armed = Promise.all(
    phones.map(
      ({ socket }, k) =>
        new Promise<number>((resolve) => {
          const listener = (state: { currentIndex?: number; version?: number }) => {
            if (index !== undefined ? state.currentIndex !== index : state.version !== version) return;
            const at = now();
            if (k === 0) lastPayload = state;
            socket.off('session:updated', listener);
            resolve(at);
          };
          socket.on('session:updated', listener);
        }),
    ),
  );
}

/** Each phone spends `dotsEach` dots, each at a random moment of the window from `startAt`, with its own client id. */
async function burst({ optionIds, dotsEach, windowMs, startAt, prefix }: { optionIds: string[]; dotsEach: number; windowMs: number; startAt: number; prefix: string }) {
  const acks: number[] = [];
  const acked: string[] = [];
  const sent: string[] = [];
  let refused = 0;
  let timedOut = 0;
  let busyErrors = 0;
  let lastAckAt = 0;
  const wait = Math.max(0, startAt - now());
  await Promise.all(
    phones.flatMap(({ index, socket }) =>
      Array.from({ length: dotsEach }, (_, k) => {
        const clientId = `${prefix}-${index}-${k}`;
        sent.push(clientId);
        return new Promise<void>((resolve) => {
          setTimeout(async () => {
            const t0 = now();
            try {
              await ask(socket, 'vote:dot', { clientId, optionId: optionIds[(index + k) % optionIds.length], criterionId: OVERALL_CRITERION, delta: 1 });
              const at = now();
              acks.push(at - t0);
              acked.push(clientId);
              lastAckAt = Math.max(lastAckAt, at);
            } catch (err) {
              if (String(err).includes('BUSY')) busyErrors += 1;
              // socket.io's own error when no acknowledgement came within the timeout.
              else if (String(err).includes('timed out')) timedOut += 1;
              else refused += 1;
            }
            resolve();
          }, wait + Math.random() * windowMs);
        });
      }),
    ),
  );
  return { acks, acked, sent, refused, timedOut, busyErrors, lastAckAt };
}

process.on('disconnect', () => process.exit(0));
process.on('message', async (msg: Request) => {
  try {
    switch (msg.type) {
      case 'clock':
        reply(msg.id, now());
        break;
      case 'join':
        reply(msg.id, await join(msg.payload));
        break;
      case 'arm':
        arm(msg.payload);
        reply(msg.id, true);
        break;
      case 'arrivals':
        reply(msg.id, { at: await armed, payload: lastPayload });
        armed = null;
        break;
      case 'burst':
        reply(msg.id, await burst(msg.payload));
        break;
      case 'close':
        for (const { socket } of phones) socket.disconnect();
        phones.length = 0;
        reply(msg.id, true);
        break;
    }
  } catch (err) {
    reply(msg.id, { error: String(err) });
  }
});
process.send?.({ ready: true });
