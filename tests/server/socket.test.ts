import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import jwt from 'jsonwebtoken';
import type { IncomingMessage } from 'node:http';
import { createStranger, demoUserId, listen, startTestApp, TEST_SECRET, type ClientSocket, type TestApp } from './helpers';

let t: TestApp;
let token: string;
let userId: string;
beforeAll(async () => {
  t = await startTestApp();
  token = await t.tokenFor('facilitator');
  userId = await demoUserId(t, 'facilitator');
});
afterAll(() => t.close());

/** The message of the `connect_error` a connection attempt ends with (fails if it connects). */
async function refusal(attempt: Promise<ClientSocket>): Promise<Error & { description?: unknown; context?: { status?: number } }> {
  try {
    const socket = await attempt;
    socket.disconnect();
  } catch (err) {
    return err as Error;
  }
  throw new Error('the connection was accepted');
}

function emitPing(socket: ClientSocket, payload: unknown) {
  // The payload is deliberately untyped: the server must validate what the types only promise.
  return socket.timeout(3000).emitWithAck('clock:ping', payload as { t1: number });
}

describe('socket authentication', () => {
  it('connects with a valid access token and answers clock:ping with t1 echoed and t2 ≤ t3', async () => {
    const socket = await t.connect(token);
    expect(socket.connected).toBe(true);
    const t1 = Date.now();
    const answer = await emitPing(socket, { t1 });
    const t4 = Date.now();
    expect('data' in answer).toBe(true);
    if (!('data' in answer)) return;
    expect(answer.data.t1).toBe(t1);
    expect(answer.data.t2).toBeLessThanOrEqual(answer.data.t3);
    // Client and server share this machine's clock, so the server's times fall inside the round trip.
    expect(answer.data.t2).toBeGreaterThanOrEqual(t1);
    expect(answer.data.t3).toBeLessThanOrEqual(t4);
    socket.disconnect();
  });

  it('echoes t1 exactly even when it is far from the server clock', async () => {
    const socket = await t.connect(token);
    const answer = await emitPing(socket, { t1: 12.5 });
    expect(answer).toEqual({ data: { t1: 12.5, t2: expect.any(Number), t3: expect.any(Number) } });
    socket.disconnect();
  });

  it('refuses a connection with no token', async () => {
    expect((await refusal(t.connect(undefined))).message).toBe('unauthenticated');
  });

  it('refuses a connection with an expired token', async () => {
    const expired = jwt.sign({ kind: 'user', tv: 0 }, TEST_SECRET, { algorithm: 'HS256', subject: userId, expiresIn: -10 });
    expect((await refusal(t.connect(expired))).message).toBe('token_expired');
  });

  it('refuses a connection with an alg:none token', async () => {
    const part = (v: unknown) => Buffer.from(JSON.stringify(v)).toString('base64url');
    const now = Math.floor(Date.now() / 1000);
    const forged = `${part({ alg: 'none', typ: 'JWT' })}.${part({ kind: 'user', sub: userId, tv: 0, iat: now, exp: now + 600 })}.`;
    expect((await refusal(t.connect(forged))).message).toBe('token_invalid');
  });

  it('refuses a token signed with another secret, a refresh token, and a token that is not a string', async () => {
    const other = jwt.sign({ kind: 'user', tv: 0 }, 'another secret that is also thirty-two characters long', {
      algorithm: 'HS256',
      subject: userId,
      expiresIn: 600,
    });
    expect((await refusal(t.connect(other))).message).toBe('token_invalid');
    const refresh = t.cairn.ctx.tokens.signRefresh(userId, 0);
    expect((await refusal(t.connect(refresh))).message).toBe('token_invalid');
    expect((await refusal(t.connect(42 as unknown as string))).message).toBe('unauthenticated');
  });

  it('refuses the token of an account that signed out everywhere', async () => {
    const s = await createStranger(t, 'socket-sign-out');
    const socketBefore = await t.connect(s.token);
    socketBefore.disconnect();
    const signIn = await t.agent.post('/api/auth/sign-in').send({ email: s.email, password: s.password });
    const cookie = ([] as string[]).concat(signIn.headers['set-cookie'] ?? []).find((c) => c.startsWith('cairn_refresh='))!.split(';')[0];
    expect((await t.agent.post('/api/auth/sign-out').set('Cookie', cookie)).status).toBe(204);
    expect((await refusal(t.connect(s.token))).message).toBe('token_invalid');
  });

  it('accepts a participant token for a live session', async () => {
    const participant = t.cairn.ctx.tokens.signParticipant('participant-1', 'session-1');
    const socket = await t.connect(participant);
    expect((await emitPing(socket, { t1: 1 })).data).toBeDefined();
    socket.disconnect();
  });
});

describe('socket origin check', () => {
  it('refuses a polling handshake from a foreign Origin', async () => {
    const err = await refusal(t.connect(token, { transports: ['polling'], extraHeaders: { Origin: 'http://evil.example' } }));
    expect(err.message).toBe('xhr poll error');
    expect(err.description).toBe(403);
  });

  it('refuses a websocket handshake from a foreign Origin', async () => {
    const err = await refusal(t.connect(token, { transports: ['websocket'], extraHeaders: { Origin: 'http://evil.example' } }));
    expect(err.message).toBe('websocket error');
  });

  it('accepts the page’s own origin (control)', async () => {
    const own = await listen(t.cairn);
    for (const transports of [['polling'], ['websocket']]) {
      const socket = await t.connect(token, { transports, extraHeaders: { Origin: own } });
      expect(socket.connected).toBe(true);
      socket.disconnect();
    }
  });

  it('accepts an origin listed in CORS_ORIGINS', async () => {
    const other = await startTestApp({ CORS_ORIGINS: 'http://projector.harbourlane.example, http://console.harbourlane.example' });
    try {
      const socket = await other.connect(await other.tokenFor('facilitator'), {
        transports: ['polling'],
        extraHeaders: { Origin: 'http://console.harbourlane.example' },
      });
      expect(socket.connected).toBe(true);
      socket.disconnect();
    } finally {
      await other.close();
    }
  });

  // `Origin: null` (a sandboxed frame or a file:// page) cannot be parsed as a URL; it must be
  // refused, not throw inside allowRequest (engine.io would not catch it). Called directly.
  it('refuses Origin: null (and any unparsable origin) without throwing', () => {
    const engine = t.cairn.io.engine as unknown as {
      opts: { allowRequest: (req: IncomingMessage, cb: (err: string | null | undefined, ok: boolean) => void) => void };
    };
    const answers: [unknown, boolean][] = [];
    for (const origin of ['null', 'not a url']) {
      const req = { headers: { origin, host: '127.0.0.1:3000' } } as unknown as IncomingMessage;
      expect(() => engine.opts.allowRequest(req, (err, ok) => answers.push([err, ok]))).not.toThrow();
    }
    expect(answers).toEqual([
      ['origin not allowed', false],
      ['origin not allowed', false],
    ]);
  });
});

describe('socket payload validation', () => {
  it.each([
    ['an empty object', {}],
    ['t1 as a string', { t1: 'now' }],
    ['t1 that is not finite', { t1: null }],
    ['no object at all', 'ping'],
  ])('answers clock:ping with %s by validation_failed', async (_name, payload) => {
    const socket = await t.connect(token);
    const answer = await emitPing(socket, payload);
    expect(answer).toMatchObject({ error: { code: 'validation_failed', message: expect.stringContaining('t1'), reason: 'payload_invalid', params: { field: expect.stringMatching(/^(t1|_)$/) } } });
    // The socket stays usable after a bad payload.
    expect('data' in (await emitPing(socket, { t1: 5 }))).toBe(true);
    socket.disconnect();
  });
});
