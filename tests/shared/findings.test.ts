import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ACTIVITY_LIBRARY, MATERIALS, MATERIAL_WHYS } from '../../shared/activities';
import { CAUTION_MESSAGES, CautionCode } from '../../shared/cautions';
import { LOCALES } from '../../shared/locales';
import { PACKING_HOW } from '../../shared/materials';
import { RULE_MESSAGES, SCHEDULE_MESSAGES, ScheduleWarningCode } from '../../shared/schedule';
import { Phase } from '../../shared/schemas/agenda-item';
import { COUNT_KINDS, activityDescriptionKey, activityNameKey, phaseKey, typeAndPhase, type MessageTable } from '../../shared/wording';
import { facilitatorWording } from '../../server/common/catalogs';

// The rules in shared/ hand the screens a message id and its values, never words: each id has its message in every
// facilitator catalog, and that message fills in exactly the values the rule declares.

type Tree = { [key: string]: string | Tree };
const catalog = (locale: string): Tree =>
  JSON.parse(readFileSync(new URL(`../../src/i18n/facilitator/${locale}.json`, import.meta.url), 'utf8'));
const at = (tree: Tree, path: string): string | undefined => {
  let node: string | Tree | undefined = tree;
  for (const part of path.split('.')) node = typeof node === 'object' ? node[part] : undefined;
  return typeof node === 'string' ? node : undefined;
};
const placeholders = (message: string): string[] => [...new Set([...message.matchAll(/\{(\w+)\}/g)].map((m) => m[1]!))].sort();

const TABLES: [string, MessageTable][] = [
  ['scheduleWarning', SCHEDULE_MESSAGES],
  ['scheduleRule', RULE_MESSAGES],
  ['caution.text', CAUTION_MESSAGES],
  ['packingHow', PACKING_HOW],
  ['packingWhy', MATERIAL_WHYS],
];

describe.each(LOCALES)('the shared rules’ messages in %s', (locale) => {
  const tree = catalog(locale);

  it.each(TABLES)('every message of %s is there, with the values its rule declares', (section, table) => {
    for (const [id, params] of Object.entries(table)) {
      const message = at(tree, `${section}.${id}`);
      expect(message, `${section}.${id}`).toBeDefined();
      expect({ id, params: placeholders(message!) }).toEqual({ id, params: Object.keys(params).sort() });
    }
  });

  it('names every activity type, with its description, every phase, every material and every counted noun', () => {
    for (const type of Object.keys(ACTIVITY_LIBRARY) as (keyof typeof ACTIVITY_LIBRARY)[]) {
      expect(at(tree, activityNameKey(type)), type).toBeTruthy();
      expect(at(tree, activityDescriptionKey(type)), type).toBeTruthy();
    }
    for (const phase of Phase.options) expect(at(tree, phaseKey(phase)), phase).toBeTruthy();
    for (const key of Object.keys(MATERIALS)) {
      expect(at(tree, `material.${key}.name`), key).toBeTruthy();
      expect(placeholders(at(tree, `material.${key}.amount`)!), key).toEqual(['n']);
    }
    for (const kind of COUNT_KINDS) expect(placeholders(at(tree, `count.${kind}`)!), kind).toEqual(['n']);
  });

  it('heads every caution and says why every schedule rule matters', () => {
    for (const code of CautionCode.options) expect(at(tree, `caution.title.${code}`), code).toBeTruthy();
    for (const code of ScheduleWarningCode.options) expect(at(tree, `scheduleRule.${code}`), code).toBeTruthy();
  });

});

describe('wording findings', () => {
  it('counts with the language’s plural forms (CLDR) and writes numbers through Intl', () => {
    const de = facilitatorWording('de');
    expect(de.t('count.people', { n: de.num(1) }, 1)).toBe('1 Person');
    expect(de.t('count.people', { n: de.num(24) }, 24)).toBe('24 Personen');
    // German writes a decimal comma (CLDR number symbols, through Intl.NumberFormat).
    expect(de.num(1.5, 2)).toBe('1,5');
    expect(facilitatorWording('es').num(1234)).toBe('1234');
    expect(facilitatorWording('en').num(1234)).toBe('1,234');
  });

  it('says a type and phase of the same word once, in the reader’s language', () => {
    expect(typeAndPhase(facilitatorWording('en'), 'closing', 'closing')).toBe('Closing');
    expect(typeAndPhase(facilitatorWording('de'), 'closing', 'closing')).toBe('Abschluss');
    expect(typeAndPhase(facilitatorWording('en'), 'dot_vote', 'ideate')).toBe('Dot vote · Ideate');
    expect(typeAndPhase(facilitatorWording('es'), 'dot_vote', 'ideate')).toBe('Votación con puntos · Idear');
  });
});
