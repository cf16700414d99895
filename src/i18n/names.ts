import { madeNameOf } from '../../shared/made-names';
import { i18n } from './index';

type Key = Parameters<typeof i18n.global.t>[0];

/**
 * A team's or a participant's name in the screen's language: a name Cairn gave ("Team 3", "Participant 12",
 * shared/made-names.ts) is worded from the catalogs (`madeName.<kind>`, "Equipo 3"); a name a person chose stays as it is.
 * @example nameText('Team 3') // 'Team 3' in English, 'Equipo 3' in Spanish
 */
export function nameText(name: string): string {
  const made = madeNameOf(name);
  if (!made) return name;
  return i18n.global.t(`madeName.${made.kind}` as Key, { n: new Intl.NumberFormat(i18n.global.locale.value).format(made.n) });
}
