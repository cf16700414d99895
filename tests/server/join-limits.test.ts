import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { JOIN_CODE_ALPHABET, JOIN_CODE_LENGTH, type LiveSessionInfo } from '../../shared/schemas/live';
import { demoWorkshop, newDeviceId, startLive, startTestApp, type TestApp } from './helpers';

// The app trusts X-Forwarded-For from loopback (a proxy on the same machine), so each test sender
// below names its own address the way a proxy in front of Cairn would.
let t: TestApp;
let info: LiveSessionInfo;

beforeAll(async () => {
  t = await startTestApp({ JOINS_PER_CODE: '12' });
  info = await startLive(t, await t.tokenFor('facilitator'), (await demoWorkshop(t)).id);
});
afterAll(() => t.close());

/** A well-formed join code other than `code`. */
function otherCode(code: string): string {
  const first = JOIN_CODE_ALPHABET.split('').find((c) => c !== code[0])!;
  return (first + code.slice(1)).slice(0, JOIN_CODE_LENGTH);
}

describe('joins of one code', () => {
  it('give each address its own share: a sender making up device ids uses up only its own, and phones elsewhere still join', async () => {
    const flooder = '198.51.100.7';
    let refused = 0;
    for (let i = 0; i < 20; i++) {
      const res = await t.agent
        .post(`/api/join/${info.joinCode}`)
        .set('X-Forwarded-For', flooder)
        .send({ displayName: `Bot ${i}`, photoConsent: false, deviceId: newDeviceId() });
      if (res.status === 429) refused++;
      else expect(res.status).toBe(200);
    }
    // JOINS_PER_CODE = 12 for this app: the 13th to the 20th are refused.
    expect(refused).toBe(8);
    // Real phones on other addresses of the room join as usual.
    for (const address of ['203.0.113.21', '203.0.113.22', '203.0.113.23']) {
      const res = await t.agent
        .post(`/api/join/${info.joinCode}`)
        .set('X-Forwarded-For', address)
        .send({ displayName: 'Ines Moreau', photoConsent: true, deviceId: newDeviceId() });
      expect(res.status).toBe(200);
    }
  });
});

describe('guessing join codes', () => {
  it('holds the limit per address whatever device id each guess sends', async () => {
    const guesser = '198.51.100.99';
    const wrong = otherCode(info.joinCode);
    const statuses: number[] = [];
    for (let i = 0; i < 205; i++) {
      const res = await t.agent.get(`/api/join/${wrong}`).set('X-Forwarded-For', guesser).set('X-Cairn-Device', newDeviceId());
      statuses.push(res.status);
    }
    // 200 failed lookups per address per 10 minutes (FAILED_LOOKUPS_PER_ADDRESS), then 429.
    expect(statuses.slice(0, 200).every((s) => s === 404)).toBe(true);
    expect(statuses.slice(200)).toEqual([429, 429, 429, 429, 429]);
    // A new device at the same address is held back too, even with the right code…
    const again = await t.agent
      .post(`/api/join/${info.joinCode}`)
      .set('X-Forwarded-For', guesser)
      .send({ displayName: 'Guess', photoConsent: false, deviceId: newDeviceId() });
    expect(again.status).toBe(429);
    expect(again.body.error).toEqual({ code: 'rate_limited', message: expect.stringMatching(/too many tries/i), reason: 'join_tries_network' });
    // The refusal says when to try again, and names the limit that held it (the first one checked: no later limit counted it).
    expect(Number(again.headers['retry-after'])).toBeGreaterThan(0);
    expect(again.headers['ratelimit']).toMatch(/^"tries-address"; r=0; t=\d+$/);
    expect(again.headers['ratelimit-policy']).toBe('"tries-address"; q=200; w=600');
    // …while another address is not.
    const other = await t.agent.get(`/api/join/${info.joinCode}`).set('X-Forwarded-For', '203.0.113.40').set('X-Cairn-Device', newDeviceId());
    expect(other.status).toBe(200);
  });
});
