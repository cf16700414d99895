import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { command, commandData, demoWorkshop, joinLive, nextEvent, startLive, startTestApp, type ClientSocket, type TestApp } from './helpers';

let t: TestApp;
let consoleSocket: ClientSocket;
let phones: ClientSocket[];
let participantIds: string[];

beforeAll(async () => {
  t = await startTestApp();
  const token = await t.tokenFor('facilitator');
  const info = await startLive(t, token, (await demoWorkshop(t)).id);
  consoleSocket = await t.connect(token);
  await commandData(consoleSocket, 'session:watch', { sessionId: info.sessionId });
  const joined = await Promise.all(['Ana', 'Ben', 'Cleo', 'Dev', 'Eli'].map((displayName) => joinLive(t, info.joinCode, { displayName })));
  participantIds = joined.map((j) => j.me.id);
  phones = await Promise.all(joined.map((j) => t.connect(j.token)));
});
afterAll(() => t.close());

describe('teams of a live session', () => {
  it('forms teams whose sizes differ by at most one, and tells every phone', async () => {
    const heard = nextEvent(phones[0]!, 'teams:updated');
    const teams = await commandData(consoleSocket, 'teams:form', { count: 2 });
    const sizes = teams.map((team) => team.members.length).sort();
    expect(sizes).toEqual([2, 3]);
    expect(new Set(teams.flatMap((team) => team.members.map((m) => m.id)))).toEqual(new Set(participantIds));
    expect((await heard).length).toBe(2);
    const me = await commandData(phones[0]!, 'participant:me');
    expect(teams.find((team) => team.id === me.teamId)?.members.some((m) => m.id === participantIds[0])).toBe(true);
  });

  it('sets teams with challenges as decided, refusing a person in two teams', async () => {
    const teams = await commandData(consoleSocket, 'teams:set', {
      teams: [
        { name: 'Unlocking', challenge: 'How might we make unlocking a bike obvious?', memberIds: participantIds.slice(0, 3) },
        { name: 'Docking', challenge: 'How might we help members find a free dock?', memberIds: participantIds.slice(3) },
      ],
    });
    expect(teams.map((team) => team.challenge)).toEqual([
      'How might we make unlocking a bike obvious?',
      'How might we help members find a free dock?',
    ]);
    const twice = await command(consoleSocket, 'teams:set', {
      teams: [
        { name: 'A', memberIds: [participantIds[0]] },
        { name: 'B', memberIds: [participantIds[0]] },
      ],
    });
    expect('error' in twice && twice.error.code).toBe('bad_request');
  });

  it('lets phones list teams but not form or set them', async () => {
    expect((await commandData(phones[1]!, 'teams:list')).length).toBe(2);
    const form = await command(phones[1]!, 'teams:form', { count: 3 });
    expect('error' in form && form.error.code).toBe('forbidden');
    const set = await command(phones[1]!, 'teams:set', { teams: [{ name: 'Mine', memberIds: [participantIds[1]] }] });
    expect('error' in set && set.error.code).toBe('forbidden');
  });

  it('refuses bad payloads', async () => {
    const bad = await command(consoleSocket, 'teams:form', { count: 0 });
    expect('error' in bad && bad.error.code).toBe('validation_failed');
  });
});
