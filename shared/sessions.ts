import { finite } from './numbers';

// Local time here is the local time of whoever computes it: the venue's laptop or the console's tablet, which share the room's clock.

/** The local calendar date of a moment, as the workshop's date is written (YYYY-MM-DD); refuses a moment that is not a finite number. */
export function localDateOf(epochMs: number): string {
  const d = new Date(finite('The moment', epochMs));
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
}

/** Minutes since local midnight of a moment (fractions kept); refuses a moment that is not a finite number. */
export function minutesOfDay(epochMs: number): number {
  const d = new Date(finite('The moment', epochMs));
  return d.getHours() * 60 + d.getMinutes() + d.getSeconds() / 60 + d.getMilliseconds() / 60_000;
}

/** A session as people name it: "Rehearsal" or "The day", with when it started (local time); refuses a start that is not a finite number. */
export function sessionName(kind: 'rehearsal' | 'day', startedAt: number): string {
  const d = new Date(finite('The start', startedAt));
  const when = `${localDateOf(startedAt)} ${String(d.getHours()).padStart(2, '0')}:${String(d.getMinutes()).padStart(2, '0')}`;
  return `${kind === 'rehearsal' ? 'Rehearsal' : 'The day'} · ${when}`;
}

/** Which live sessions results cover: the day's (the default), every one, or the ones named. */
export type SessionSelector = 'day' | 'all' | string[];

/**
 * Reads the `sessions` query of the results, exports and report: `day` (or nothing), `all`, or session
 * ids separated by commas.
 * @example parseSessionSelector('a1,b2') // ['a1', 'b2']
 */
export function parseSessionSelector(raw: string | undefined): SessionSelector {
  const value = (raw ?? '').trim();
  if (value === '' || value === 'day') return 'day';
  if (value === 'all') return 'all';
  return [...new Set(value.split(',').map((s) => s.trim()).filter(Boolean))];
}

/**
 * The sessions a selector covers, in the order given: the day's sessions (not the rehearsals), all of
 * them, or the ones named (unknown ids are ignored).
 * @example selectSessions(sessions, 'day')
 */
export function selectSessions<T extends { id: string; kind: 'rehearsal' | 'day' }>(sessions: T[], selector: SessionSelector): T[] {
  if (selector === 'all') return sessions;
  if (selector === 'day') return sessions.filter((s) => s.kind === 'day');
  const wanted = new Set(selector);
  return sessions.filter((s) => wanted.has(s.id));
}
