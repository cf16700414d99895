import { describe, expect, it } from 'vitest';
import { countdownText, firstScreenFor, firstScreenKey, keepFirstScreen, parseFirstScreen, participantTokenKey, phoneSessionOf, type FirstScreen } from '../../src/boot/first-screen';

const SESSION = '3f2a9c0e-0000-4000-8000-000000000001';
const SCREEN: FirstScreen = {
  sessionId: SESSION,
  lang: 'en',
  name: 'Ines',
  topHeight: 64,
  nameOffset: 22,
  position: 'Activity 2 of 9',
  title: 'Warm-up pairs',
  prompt: 'Tell each other about the last repair you did.',
  timer: { status: 'running', endsAt: 100_000, remainingMs: null, durationMs: 600_000 },
};

/** A phone's storage as a map, with the calls it got. */
function storage(items: Record<string, string> = {}) {
  const map = new Map(Object.entries(items));
  return {
    map,
    getItem: (k: string) => map.get(k) ?? null,
    setItem: (k: string, v: string) => void map.set(k, v),
    removeItem: (k: string) => void map.delete(k),
  };
}

describe("a joined phone's first screen", () => {
  it('is painted only on the phone page itself, not on its sub-pages or elsewhere', () => {
    expect(phoneSessionOf(`/phone/${SESSION}`)).toBe(SESSION);
    expect(phoneSessionOf(`/phone/${SESSION}/`)).toBe(SESSION);
    expect(phoneSessionOf(`/phone/${SESSION}/my-data`)).toBeNull();
    expect(phoneSessionOf('/join')).toBeNull();
    expect(phoneSessionOf(`/projector/${SESSION}`)).toBeNull();
  });

  it("is painted from the kept screen only when the phone holds the participant's token for that session", () => {
    const kept = { [firstScreenKey(SESSION)]: JSON.stringify(SCREEN) };
    expect(firstScreenFor(`/phone/${SESSION}`, storage({ ...kept, [participantTokenKey(SESSION)]: 'token' }))).toEqual(SCREEN);
    // Someone else's browser with the kept record but no token of the session: nothing.
    expect(firstScreenFor(`/phone/${SESSION}`, storage(kept))).toBeNull();
    // A token of another session does not open this one's kept screen.
    expect(firstScreenFor(`/phone/${SESSION}`, storage({ ...kept, [participantTokenKey('other')]: 'token' }))).toBeNull();
    // Nothing kept yet: the page paints once its scripts have run.
    expect(firstScreenFor(`/phone/${SESSION}`, storage({ [participantTokenKey(SESSION)]: 'token' }))).toBeNull();
  });

  it('paints nothing from a record of another session, a damaged one or one of an older shape', () => {
    expect(parseFirstScreen(JSON.stringify({ ...SCREEN, sessionId: 'other' }), SESSION)).toBeNull();
    expect(parseFirstScreen('{"sessionId":', SESSION)).toBeNull();
    expect(parseFirstScreen(JSON.stringify({ ...SCREEN, prompt: undefined }), SESSION)).toBeNull();
    expect(parseFirstScreen(JSON.stringify({ ...SCREEN, timer: { status: 'ticking', endsAt: 1, remainingMs: null, durationMs: 1 } }), SESSION)).toBeNull();
    expect(parseFirstScreen(JSON.stringify({ state: {}, me: {} }), SESSION)).toBeNull();
    expect(parseFirstScreen(JSON.stringify({ ...SCREEN, topHeight: undefined }), SESSION)).toBeNull();
    expect(parseFirstScreen(null, SESSION)).toBeNull();
  });

  it("shows the time left as the page's countdown does before its clock sync: from the phone's own clock", () => {
    expect(countdownText(SCREEN, 40_000)).toBe('01:00');
    expect(countdownText({ ...SCREEN, timer: { status: 'paused', endsAt: null, remainingMs: 90_500, durationMs: 600_000 } }, 40_000)).toBe('01:31');
    expect(countdownText({ ...SCREEN, timer: { status: 'idle', endsAt: null, remainingMs: null, durationMs: 600_000 } }, 40_000)).toBe('10:00');
  });

  it('is kept as the page shows it and forgotten when there is nothing to show (the session ended)', () => {
    const store = storage();
    keepFirstScreen(store, SESSION, SCREEN);
    expect(parseFirstScreen(store.getItem(firstScreenKey(SESSION)), SESSION)).toEqual(SCREEN);
    keepFirstScreen(store, SESSION, null);
    expect(store.map.size).toBe(0);
    // A full storage costs only the early paint.
    expect(() =>
      keepFirstScreen({ setItem: () => { throw new Error('QuotaExceededError'); }, removeItem: () => undefined }, SESSION, SCREEN),
    ).not.toThrow();
  });
});
