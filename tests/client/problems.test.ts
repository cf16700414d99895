import { beforeAll, describe, expect, it, vi } from 'vitest';

// Quasar's components need a browser; only its language switch is imported by the catalogs' module, and no test here switches it.
vi.mock('quasar', () => ({ Lang: { set: () => undefined } }));
import { i18n } from '../../src/i18n';
import { issueText, problemText } from '../../src/i18n/problems';
import { ClientError } from '../../src/api/errors';
import { fieldIssues } from '../../shared/errors';
import { WorkshopBrief } from '../../shared/schemas/workshop';
import { errorText } from '../../src/i18n/errors';
import { castDot } from '../../shared/votes';
import en from '../../src/i18n/facilitator/en.json';
import de from '../../src/i18n/facilitator/de.json';
import phoneDe from '../../src/i18n/locales/de.json';
import phoneEs from '../../src/i18n/locales/es.json';

// The facilitator's screens say the server's reasons and a form's field issues in their language, never a schema's words.
beforeAll(() => {
  i18n.global.mergeLocaleMessage('en', en as never);
  i18n.global.setLocaleMessage('de', phoneDe as never);
  i18n.global.mergeLocaleMessage('de', de as never);
  i18n.global.setLocaleMessage('es', phoneEs as never);
});

describe('what a facilitator’s screen says about a failed call', () => {
  it('words a limit with what the field counts', () => {
    i18n.global.locale.value = 'en';
    expect(issueText('teamCount', { code: 'too_small', params: { min: 1, of: 'number' } })).toBe('At least 1 team');
    expect(issueText('roomCapacity', { code: 'too_big', params: { max: 2000, of: 'number' } })).toBe('At most 2000 people');
    expect(issueText('rules.loadCeilingPct', { code: 'too_small', params: { min: 10, of: 'number' } })).toBe('At least 10\u00a0%');
    expect(issueText('title', { code: 'too_small', params: { min: 3, of: 'string' } })).toBe('Use at least 3 characters');
  });

  it('words the schema’s own rules and the same check run on the screen', () => {
    i18n.global.locale.value = 'en';
    const brief = WorkshopBrief.safeParse({ teamCount: 0, window: { doorsOpen: '09:00', start: '08:00', end: '17:00', doorsClose: '18:00' } });
    const issues = fieldIssues(brief.error!);
    expect(issueText('teamCount', issues.teamCount!)).toBe('At least 1 team');
    expect(issueText('window.start', issues['window.start']!)).toBe('The workshop cannot start before the doors open');
  });

  it('says a reason with its values in German, and a code when there is no reason', () => {
    i18n.global.locale.value = 'de';
    const err = new ClientError('bad_request', 'Pick 3 options', 400, {}, { reason: 'pick_n_options', params: { n: 3 } });
    expect(problemText(err, 'x')).toBe('Wählen Sie 3 Optionen.');
    expect(issueText('teamCount', { code: 'too_small', params: { min: 1, of: 'number' } })).toBe('Mindestens 1 Team');
    expect(problemText(new ClientError('forbidden', 'Your role does not allow this', 403), 'x')).toBe('Ihre Rolle erlaubt das nicht.');
    expect(problemText(new Error('a programming error'), 'Der Plan konnte nicht geladen werden')).toBe('Der Plan konnte nicht geladen werden');
    i18n.global.locale.value = 'en';
  });

  it('names a rejected field and its limit, and never shows the server’s English for its own failure', () => {
    i18n.global.locale.value = 'en';
    const long = new ClientError('validation_failed', 'The request has fields that need fixing', 400, { title: 'Too big' }, { fieldIssues: { title: { code: 'too_big', params: { max: 120, of: 'string' } } } });
    expect(problemText(long, 'x')).toBe('Title: Keep this to 120 characters or fewer');
    const socket = new ClientError('validation_failed', 'teamCount: Too small', 0, {}, { reason: 'payload_invalid', params: { field: 'teamCount' }, fieldIssues: { teamCount: { code: 'too_small', params: { min: 1, of: 'number' } } } });
    i18n.global.locale.value = 'de';
    expect(problemText(socket, 'x')).toBe('Teams: Mindestens 1 Team');
    expect(problemText(new ClientError('internal', 'Something went wrong on the server', 500), 'Die Sitzungen konnten nicht geladen werden')).not.toContain('Something');
    i18n.global.locale.value = 'en';
  });
});

describe('what a phone says about a refused note, photo or dot', () => {
  it('words the server’s reason in the phone’s language, with its count’s plural form', () => {
    i18n.global.locale.value = 'de';
    const tooMany = new ClientError('bad_request', 'You have added 30 photos…', 400, {}, { reason: 'photo_limit', params: { count: 30 } });
    expect(errorText(tooMany)).toBe('Du hast 30 Fotos zu dieser Aktivität hinzugefügt, so viele wie eine Person kann; bitte die Moderation, einige auszublenden.');
    i18n.global.locale.value = 'es';
    expect(errorText(new ClientError('bad_request', 'This activity takes no notes', 400, {}, { reason: 'note_not_taken' }))).toBe('Esta actividad no recibe notas.');
    i18n.global.locale.value = 'en';
  });

  it('words a socket payload’s rejected field by its name and its limit, never the schema’s English', () => {
    i18n.global.locale.value = 'en';
    const refused = new ClientError('validation_failed', 'text: Keep a note under 500 characters', 0, {}, {
      reason: 'payload_invalid',
      params: { field: 'text' },
      fieldIssues: { text: { code: 'too_big', params: { max: 500, of: 'string' } } },
    });
    expect(errorText(refused)).toBe('Note: Keep it to 500 characters');
    // A field the phone has no name for says the reason with its path.
    const other = new ClientError('validation_failed', 'clientId: Too small', 0, {}, { reason: 'payload_invalid', params: { field: 'clientId' }, fieldIssues: { clientId: { code: 'too_small', params: { min: 8, of: 'string' } } } });
    expect(errorText(other)).toBe('Something this screen sent was not accepted (clientId); reload the page and try again.');
  });

  it('words a dot the phone’s own check refuses, with the criterion’s name', () => {
    i18n.global.locale.value = 'de';
    const rules = { dotsPerVoter: 2, capPerOption: 2, allowStacking: true, criteria: [{ id: 'impact', label: 'Wirkung' }] } as never;
    const cast = castDot(rules, [{ voterId: 'me', optionId: 'a', criterionId: 'impact', count: 2 }], 'me', { optionId: 'b', criterionId: 'impact', delta: 1 });
    expect(cast.ok).toBe(false);
    if (!cast.ok) expect(errorText(new ClientError(cast.code, cast.message, 0, {}, cast.why))).toBe('Du hast 2 Punkte für Wirkung, 0 davon übrig.');
    i18n.global.locale.value = 'en';
  });
});

describe('names Cairn gives, on each screen', () => {
  it('words a numbered team or participant in the screen’s language and leaves a chosen name alone', async () => {
    const { nameText } = await import('../../src/i18n/names');
    const { madeName, madeNameOf } = await import('../../shared/made-names');
    expect(madeNameOf(madeName('team', 3))).toEqual({ kind: 'team', n: 3 });
    expect(madeNameOf(madeName('participant', 12))).toEqual({ kind: 'participant', n: 12 });
    expect(madeNameOf('Team Dock')).toBeNull();
    i18n.global.locale.value = 'es';
    expect(nameText('Team 3')).toBe('Equipo 3');
    expect(nameText('Participant 12')).toBe('Participante 12');
    expect(nameText('Team Dock')).toBe('Team Dock');
    i18n.global.locale.value = 'de';
    expect(nameText('Participant 2')).toBe('Person 2');
    i18n.global.locale.value = 'en';
  });
});
