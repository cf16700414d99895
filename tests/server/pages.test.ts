import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { LiveSessionInfo } from '../../shared/schemas/live';
import { command, commandData, demoWorkshop, joinLive, nextEvent, startLive, startTestApp, type ClientSocket, type TestApp } from './helpers';

let t: TestApp;
let info: LiveSessionInfo;
let owner: ClientSocket;
let projector: ClientSocket;
let phone: ClientSocket;

beforeAll(async () => {
  t = await startTestApp();
  const demo = await demoWorkshop(t);
  const ownerToken = await t.tokenFor('facilitator');
  info = await startLive(t, ownerToken, demo.id);
  owner = await t.connect(ownerToken);
  await commandData(owner, 'session:watch', { sessionId: info.sessionId });
  projector = await t.connect(new URL(info.displayUrl).searchParams.get('display')!);
  phone = await t.connect((await joinLive(t, info.joinCode, { displayName: 'Priya Natarajan' })).token);
});
afterAll(() => t.close());

describe("the projector's pages, stepped from the console (issue 12)", () => {
  it('a projector says which page it shows; the console hears it, and a console opened later gets it at once', async () => {
    const heard = nextEvent(owner, 'pages:shown');
    expect(await commandData(projector, 'pages:show', { key: 'item-1:results', page: 1, pages: 5 })).toEqual({ key: 'item-1:results', page: 1, pages: 5 });
    expect(await heard).toEqual({ key: 'item-1:results', page: 1, pages: 5 });
    expect(await commandData(owner, 'pages:get', {})).toEqual({ key: 'item-1:results', page: 1, pages: 5 });
  });

  it('the console turns the page: every screen of the session hears the turn, phones do not', async () => {
    const atProjector = nextEvent(projector, 'pages:turned');
    const atPhone = nextEvent(phone, 'pages:turned', () => true, 500).then(
      () => 'heard',
      () => 'not heard',
    );
    await commandData(owner, 'pages:turn', { key: 'item-1:results', step: -1 });
    expect(await atProjector).toEqual({ key: 'item-1:results', step: -1 });
    expect(await atPhone).toBe('not heard');
  });

  it('refuses a phone saying or turning pages, and payloads out of bounds', async () => {
    expect(await command(phone, 'pages:show', { key: 'x', page: 0, pages: 2 })).toMatchObject({ error: { code: 'forbidden' } });
    expect(await command(phone, 'pages:turn', { key: 'x', step: 1 })).toMatchObject({ error: { code: 'forbidden' } });
    expect(await command(projector, 'pages:turn', { key: 'x', step: 1 })).toMatchObject({ error: { code: 'forbidden' } });
    for (const bad of [{ key: 'x', page: 3, pages: 3 }, { key: 'x', page: -1, pages: 3 }, { key: 'x'.repeat(101), page: 0, pages: 2 }, { key: 'x', page: 0, pages: 2, extra: 1 }]) {
      expect(await command(projector, 'pages:show', bad), JSON.stringify(bad)).toMatchObject({ error: { code: 'validation_failed' } });
    }
    for (const bad of [{ key: 'x', step: 2 }, { key: 'x', step: 0 }, { key: 'x' }]) {
      expect(await command(owner, 'pages:turn', bad), JSON.stringify(bad)).toMatchObject({ error: { code: 'validation_failed' } });
    }
  });
});
