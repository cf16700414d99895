import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, command, commandData, demoWorkshop, joinLive, startLive, startTestApp, type ClientSocket, type TestApp } from './helpers';

let t: TestApp;
let flooder: ClientSocket;
let neighbour: ClientSocket;
let owner: string;
let workshopId: string;

beforeAll(async () => {
  t = await startTestApp();
  owner = await t.tokenFor('facilitator');
  workshopId = (await demoWorkshop(t)).id;
  const info = await startLive(t, owner, workshopId);
  const [a, b] = await Promise.all([joinLive(t, info.joinCode, { displayName: 'Flo' }), joinLive(t, info.joinCode, { displayName: 'Nia' })]);
  flooder = await t.connect(a.token);
  neighbour = await t.connect(b.token);
});
afterAll(() => t.close());

describe('event floods', () => {
  it('throttles a phone that floods events, without slowing the others down', async () => {
    const flood = await Promise.all(Array.from({ length: 300 }, () => command(flooder, 'clock:ping', { t1: Date.now() })));
    const limited = flood.filter((a) => 'error' in a && a.error.code === 'rate_limited').length;
    expect(limited).toBeGreaterThan(200);
    const started = Date.now();
    const answer = await command(neighbour, 'clock:ping', { t1: started });
    expect('data' in answer).toBe(true);
    expect(Date.now() - started).toBeLessThan(500);
  });

  it('lets the flooding phone act again once it slows down', async () => {
    await new Promise((r) => setTimeout(r, 1500));
    expect('data' in (await command(flooder, 'clock:ping', { t1: Date.now() }))).toBe(true);
  });
});

describe('oversized and hostile input', () => {
  it('closes a socket that sends a payload above the size limit', async () => {
    const big = 'x'.repeat(300 * 1024);
    const closed = new Promise<string>((resolve) => neighbour.once('disconnect', (reason) => resolve(reason)));
    (neighbour as unknown as { emit(event: string, payload: unknown): void }).emit('session:sync', { filler: big });
    expect(await closed).toBeTruthy();
  });

  it('refuses a submission that is too long, with a clear message', async () => {
    const state = await commandData(flooder, 'session:sync');
    const answer = await command(flooder, 'submission:create', {
      clientId: 'too-long-note-1',
      itemId: state.item!.id,
      kind: 'note',
      text: 'x'.repeat(501),
    });
    expect('error' in answer && answer.error.code).toBe('validation_failed');
    expect('error' in answer && answer.error.message).toMatch(/500/);
  });

  it('stores HTML in text fields as plain text and answers it as JSON, never as markup', async () => {
    const title = '<img src=x onerror="alert(1)"> Docking <b>day</b>';
    const res = await t.agent
      .post('/api/workshops')
      .set('Authorization', bearer(owner))
      .send({ title, objective: '<script>alert(1)</script>', date: '2027-04-01', headcount: 12 });
    expect(res.status).toBe(201);
    expect(res.headers['content-type']).toMatch(/application\/json/);
    expect(res.body.title).toBe(title);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
  });

  it('sends a Content-Security-Policy that allows nothing from other origins', async () => {
    const res = await t.agent.get('/api/health');
    const csp = res.headers['content-security-policy'] as string;
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).toContain("object-src 'none'");
    expect(csp).toContain("frame-ancestors 'none'");
  });
});
