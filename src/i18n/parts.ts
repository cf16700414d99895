import { i18n } from './index';

type Key = Parameters<typeof i18n.global.t>[0];

/** A note part's name in the screen's language (`part.<id>.label`), else the name it came with. */
export function partName(part: { id: string; label: string }): string {
  const key = `part.${part.id}.label`;
  return i18n.global.te(key) ? i18n.global.t(key as Key) : part.label;
}

/** A note part's hint in the screen's language (`part.<id>.hint`), else the hint it came with. */
export function partHint(part: { id: string; hint?: string }): string {
  const key = `part.${part.id}.hint`;
  return i18n.global.te(key) ? i18n.global.t(key as Key) : (part.hint ?? '');
}

/** The words of a list ("Sees, Hears and Pains") joined as the screen's language joins them (`Intl.ListFormat`). */
export function listOf(words: readonly string[]): string {
  return new Intl.ListFormat(i18n.global.locale.value, { type: 'conjunction' }).format(words);
}
