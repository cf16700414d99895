import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { FACILITATOR_REASONS, PARTICIPANT_REASONS } from '../../shared/reasons';
import { LOCALES } from '../../shared/locales';

// The server sends a reason and its values, never words a screen shows: each reason has its message in every
// language of the catalogs that screen reads, and that message fills in exactly the values the reason declares.

type Tree = { [key: string]: string | Tree };
const catalog = (set: 'locales' | 'facilitator', locale: string): Tree =>
  JSON.parse(readFileSync(new URL(`../../src/i18n/${set}/${locale}.json`, import.meta.url), 'utf8'));
const at = (tree: Tree, path: string): string | undefined => {
  let node: string | Tree | undefined = tree;
  for (const part of path.split('.')) node = typeof node === 'object' ? node[part] : undefined;
  return typeof node === 'string' ? node : undefined;
};
const placeholders = (message: string): string[] => [...new Set([...message.matchAll(/\{(\w+)\}/g)].map((m) => m[1]!))].sort();

describe.each(LOCALES)('error reasons in %s', (locale) => {
  it.each(Object.entries(PARTICIPANT_REASONS))('a phone says %s (error.<reason>) with its values', (reason, params) => {
    const message = at(catalog('locales', locale), `error.${reason}`);
    expect(message, reason).toBeDefined();
    expect(placeholders(message!)).toEqual([...params].sort());
  });

  it.each(Object.entries(FACILITATOR_REASONS))('a facilitator’s screen says %s (problem.<reason>) with its values', (reason, params) => {
    const message = at(catalog('facilitator', locale), `problem.${reason}`);
    expect(message, reason).toBeDefined();
    expect(placeholders(message!)).toEqual([...params].sort());
  });

  it('a facilitator’s screen has a message for every rule a schema names (refine … params.reason)', () => {
    const dir = new URL('../../shared/schemas/', import.meta.url);
    const named = readdirSync(dir)
      .flatMap((f) => [...readFileSync(new URL(f, dir), 'utf8').matchAll(/params: \{ reason: '(\w+)' \}/g)].map((m) => m[1]!))
      // The server names this one for the current-password field (server/features/auth/auth.service.ts).
      .concat('current_password_wrong');
    expect(named.length).toBeGreaterThan(5);
    for (const reason of named) expect(at(catalog('facilitator', locale), `problemField.${reason}`), reason).toBeDefined();
  });
});

describe('error reasons', () => {
  it('are each declared once, as a participant’s or a facilitator’s', () => {
    const both = Object.keys(PARTICIPANT_REASONS).filter((r) => r in FACILITATOR_REASONS);
    expect(both).toEqual([]);
  });
});
