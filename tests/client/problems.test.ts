import { beforeAll, describe, expect, it, vi } from 'vitest';

// Quasar's components need a browser; only its language switch is imported by the catalogs' module, and no test here switches it.
vi.mock('quasar', () => ({ Lang: { set: () => undefined } }));
import { i18n } from '../../src/i18n';
import { issueText, problemText } from '../../src/i18n/problems';
import { ClientError } from '../../src/api/errors';
import { fieldIssues } from '../../shared/errors';
import { WorkshopBrief } from '../../shared/schemas/workshop';
import en from '../../src/i18n/facilitator/en.json';
import de from '../../src/i18n/facilitator/de.json';

// The facilitator's screens say the server's reasons and a form's field issues in their language, never a schema's words.
beforeAll(() => {
  i18n.global.mergeLocaleMessage('en', en as never);
  i18n.global.setLocaleMessage('de', de as never);
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
});
