import { CRITERION_MARKS, MARK_LETTER } from '../../shared/marks';
import { LIGHT, PROJECTOR } from '../../shared/palette';

/** Cairn's light palette and the projector's dark one, declared in shared/palette.ts so the PDF report prints in the same colours. */
export { LIGHT, PROJECTOR } from '../../shared/palette';

/** Quasar's brand colours (its `primary`, `negative`, … props and `text-*` / `bg-*` classes), taken from the palette. */
export const QUASAR_BRAND = {
  primary: LIGHT.primary,
  secondary: LIGHT.sand,
  accent: LIGHT.accent,
  dark: PROJECTOR.surface,
  positive: LIGHT.positive,
  negative: LIGHT.negative,
  info: LIGHT.info,
  warning: LIGHT.warningMark,
} as const;

const kebab = (name: string): string => name.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`);

/**
 * Every palette colour as a CSS custom property: `--cairn-<name>` for the light palette and
 * `--cairn-projector-<name>` for the projector's; components take their colours only from these.
 * @example cssVariables()['--cairn-primary'] // '#0b5d5b'
 */
export function cssVariables(): Record<string, string> {
  return {
    ...Object.fromEntries(Object.entries(LIGHT).map(([k, v]) => [`--cairn-${kebab(k)}`, v])),
    ...Object.fromEntries(Object.entries(PROJECTOR).map(([k, v]) => [`--cairn-projector-${kebab(k)}`, v])),
  };
}

/** Writes every palette variable onto an element's style (the document's root at start-up), so `var(--cairn-…)` resolves everywhere below it. */
export function applyPalette(style: Pick<CSSStyleDeclaration, 'setProperty'>): void {
  for (const [name, value] of Object.entries(cssVariables())) style.setProperty(name, value);
}

/**
 * Writes Quasar's brand colours (`--q-primary`, …) as Quasar does when it starts (onto the body, from
 * `QUASAR_BRAND`), for a screen painted before Quasar has started (src/boot/first-screen-paint.ts): its
 * `bg-primary` button is Cairn's colour from the first paint, not Quasar's own.
 */
export function applyQuasarBrand(style: Pick<CSSStyleDeclaration, 'setProperty'>): void {
  for (const [name, value] of Object.entries(QUASAR_BRAND)) style.setProperty(`--q-${name}`, value);
}

/** Cairn's own dot palette for criteria, declared in shared/ so the PDF draws the same marks. */
export { CRITERION_MARKS } from '../../shared/marks';

/** The projector's light counterparts of the criterion colours: the marks' own colours are too dark to see on its dark screen. */
export const PROJECTOR_MARK_COLOURS = [PROJECTOR.teal, PROJECTOR.coral, PROJECTOR.sand, PROJECTOR.muted] as const;

/**
 * Text and background pairs the screens use, checked against WCAG 2.x AA in the tests.
 * Each entry is [foreground, background, where it is used].
 */
export const TEXT_PAIRS: [string, string, string][] = [
  [LIGHT.text, LIGHT.background, 'body text on the page'],
  [LIGHT.text, LIGHT.surface, 'body text on cards'],
  [LIGHT.muted, LIGHT.background, 'secondary text on the page'],
  [LIGHT.muted, LIGHT.surface, 'secondary text on cards'],
  [LIGHT.onPrimary, LIGHT.primary, 'button text on teal'],
  [LIGHT.onPrimary, LIGHT.accent, 'button text on coral'],
  [LIGHT.primary, LIGHT.surface, 'teal links and headings on cards'],
  [LIGHT.primary, LIGHT.background, 'teal headings on the page'],
  [LIGHT.primaryDark, LIGHT.sand, 'text on sand chips'],
  [LIGHT.text, LIGHT.sandLight, 'text on the sand header'],
  [LIGHT.negative, LIGHT.surface, 'error messages'],
  [LIGHT.warning, LIGHT.warningBg, 'warning text on its banner'],
  [LIGHT.accent, LIGHT.surface, 'coral countdown on cards'],
  [LIGHT.positiveInk, LIGHT.positiveBg, 'connected chip'],
  [LIGHT.negativeInk, LIGHT.negativeBg, 'reconnecting chip'],
  [LIGHT.negativeDeep, LIGHT.negativeBg, 'offline banner on phones'],
  [LIGHT.warningInk, LIGHT.warningBg, 'shortening suggestion on the console'],
  [LIGHT.text, LIGHT.primaryTint, 'current item on the console timeline'],
  [PROJECTOR.text, PROJECTOR.background, 'projector text'],
  [PROJECTOR.muted, PROJECTOR.background, 'projector secondary text'],
  [PROJECTOR.teal, PROJECTOR.background, 'projector headings'],
  [PROJECTOR.coral, PROJECTOR.background, 'projector countdown'],
  [PROJECTOR.sand, PROJECTOR.surface, 'projector cards'],
  [PROJECTOR.text, PROJECTOR.surface, 'projector text on cards'],
  // A letter on the sticker's colour is drawn in the paper's colour; a letter on the paper in the sticker's.
  ...CRITERION_MARKS.map((m): [string, string, string] =>
    MARK_LETTER[m.shape].on === 'mark' ? [LIGHT.surface, m.colour, `criterion letter ${m.letter} on its mark`] : [m.colour, LIGHT.surface, `criterion letter ${m.letter} inside its mark`],
  ),
  ...CRITERION_MARKS.map((m, i): [string, string, string] => {
    const colour = PROJECTOR_MARK_COLOURS[i]!;
    return MARK_LETTER[m.shape].on === 'mark'
      ? [PROJECTOR.background, colour, `criterion letter ${m.letter} on its projector mark`]
      : [colour, PROJECTOR.background, `criterion letter ${m.letter} inside its projector mark`];
  }),
  [LIGHT.warning, LIGHT.surface, 'uneven team sizes warning on the console'],
  [LIGHT.positive, LIGHT.surface, 'confirmations on cards'],
  [LIGHT.positive, LIGHT.background, 'confirmations on the phone page'],
  [LIGHT.negative, LIGHT.background, 'refused votes on the phone page'],
  [PROJECTOR.teal, PROJECTOR.surface, 'team names and matrix headings on projector cards'],
  [PROJECTOR.muted, PROJECTOR.surface, 'dot counts on projector cards'],
  [LIGHT.muted, LIGHT.sandLight, 'counts and hints on sand panels (map quadrants, themes)'],
  ['#424242', LIGHT.surface, 'unselected part buttons on phones'],
  [PROJECTOR.background, PROJECTOR.sand, 'notes on the projector'],
  [PROJECTOR.coral, PROJECTOR.surface, 'pair joiner on projector cards'],
];
