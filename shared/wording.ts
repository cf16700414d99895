import type { ActivityType, Phase } from './schemas/agenda-item';

// No zod and no words here: the rules in shared/ say what they found as a message id and its values; the screens
// (src/i18n, vue-i18n) and the server's report (server/common/catalogs.ts) word it from the facilitator catalogs.

/**
 * How a screen writes a value it fills into a message: `text` as it is (an item's title), `number` through
 * `Intl` in the reader's locale, `clock` as the 24-hour time it already is, `phase` by the phase's name in the
 * catalogs, `percent` as a number with a no-break space and the sign; `people`, `teams`, `dots` and `criteria`
 * as a count with its noun in the right plural form (`count.<kind>`: "1 person", "24 people").
 */
export type ParamKind = 'text' | 'number' | 'clock' | 'phase' | 'percent' | CountKind;
/** The nouns a message counts inside its words. */
export const COUNT_KINDS = ['people', 'teams', 'dots', 'criteria'] as const;
/** A counted noun, e.g. `'people'`. */
export type CountKind = (typeof COUNT_KINDS)[number];

/** A table of messages: each message id with the values it fills in and how each is written. */
export type MessageTable = Readonly<Record<string, Readonly<Record<string, ParamKind>>>>;

/**
 * What a rule found, for a screen to say in its language: the message id (under the table's catalog section)
 * and its values. A value named `n` also picks the message's plural form (CLDR, through the catalogs).
 */
export interface Finding<M extends string = string> {
  message: M;
  params: Readonly<Record<string, string | number>>;
}

/** What a screen or the server needs to word findings: a catalog lookup and the locale's number format. */
export interface Wording {
  /** The catalog's message under `key` with `params` filled in; `plural` picks the plural form. */
  t: (key: string, params?: Record<string, string | number>, plural?: number) => string;
  /** A number as the locale writes it (`Intl.NumberFormat`), with at most `digits` decimals. */
  num: (value: number, digits?: number) => string;
}

/** The catalog key of an activity type's name ("Dot vote"). */
export const activityNameKey = (type: ActivityType): string => `activityType.${type}.name`;
/** The catalog key of an activity type's one-line description. */
export const activityDescriptionKey = (type: ActivityType): string => `activityType.${type}.description`;
/** The catalog key of a phase's name ("Ideate"). */
export const phaseKey = (phase: Phase): string => `phase.${phase}`;

/**
 * A finding's message in the reader's language: each value written by its kind, the plural form picked by `n`.
 * @example sayFinding(wording, 'scheduleWarning', SCHEDULE_MESSAGES, { message: 'talk_too_long', params: { item: 'Welcome', n: 20, max: 15 } })
 */
export function sayFinding(w: Wording, section: string, table: MessageTable, finding: Finding): string {
  const kinds = table[finding.message] ?? {};
  const values: Record<string, string> = {};
  for (const [name, value] of Object.entries(finding.params)) {
    const kind = kinds[name] ?? 'text';
    if (typeof value === 'number' && kind === 'percent') values[name] = `${w.num(value, 1)}\u00a0%`;
    else if (typeof value === 'number' && (COUNT_KINDS as readonly string[]).includes(kind)) values[name] = w.t(`count.${kind}`, { n: w.num(value) }, value);
    else if (typeof value === 'number') values[name] = w.num(value, 2);
    else if (kind === 'phase') values[name] = w.t(phaseKey(value as Phase));
    else values[name] = value;
  }
  const n = finding.params.n;
  const key = `${section}.${finding.message}`;
  return typeof n === 'number' ? w.t(key, values, n) : w.t(key, values);
}

/**
 * An item's activity type and phase as a heading line says them ("Dot vote · Ideate"); said once when
 * both are the same word in the reader's language ("Closing", never "Closing · Closing").
 * @example typeAndPhase(wording, 'closing', 'closing') // 'Closing'
 */
export function typeAndPhase(w: Pick<Wording, 't'>, type: ActivityType, phase: Phase): string {
  const label = w.t(activityNameKey(type));
  const phaseLabel = w.t(phaseKey(phase));
  return label.toLocaleLowerCase() === phaseLabel.toLocaleLowerCase() ? label : `${label} · ${phaseLabel}`;
}
