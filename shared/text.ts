/**
 * Bidirectional embeddings, overrides and isolates (U+202A–U+202E, U+2066–U+2069): they reorder how
 * the text around them is shown (Unicode Standard Annex #9, §2.1–2.4), so a name could look like
 * someone else's or run backwards over the next column.
 */
const BIDI_CONTROLS = /[\u202A-\u202E\u2066-\u2069]/gu;
/** Control characters (general category Cc), all of them in a one-line text. */
const CONTROLS = /\p{Cc}/gu;
/** Control characters but the line break and tab, for text that may run over several lines. */
const CONTROLS_BUT_LINES = /(?![\n\t])\p{Cc}/gu;
/**
 * What shows nothing on a screen: white space, control and format characters (Cc, Cf: zero-width
 * space and joiners, the byte order mark, bidi marks) and the code points Unicode says to ignore
 * when there is nothing to show for them (Default_Ignorable_Code_Point, e.g. U+3164 Hangul filler,
 * variation selectors).
 */
const INVISIBLE = /[\s\p{Cc}\p{Cf}\p{Z}\p{Default_Ignorable_Code_Point}]/gu;

/**
 * Normalises text a person typed: Unicode NFC (Unicode Standard Annex #15), without bidi overrides
 * and control characters (line breaks, as LF, and tabs kept when `multiline`), trimmed.
 * @example normaliseText('\u202Eadmin\u0007 ') // 'admin'
 */
export function normaliseText(text: string, multiline = false): string {
  return text
    .normalize('NFC')
    .replace(BIDI_CONTROLS, '')
    // A line break typed on another system (CRLF, or a lone CR) stays one line break.
    .replace(/\r\n?/g, multiline ? '\n' : ' ')
    .replace(multiline ? CONTROLS_BUT_LINES : CONTROLS, '')
    .trim();
}

/**
 * Whether text has anything a reader can see: something left once white space, zero-width and other
 * invisible characters are taken out.
 * @example hasVisibleText('\u200B\uFEFF ') // false
 */
export function hasVisibleText(text: string): boolean {
  return text.replace(INVISIBLE, '').length > 0;
}

/** What a person is told when a text has nothing that shows. */
export const INVISIBLE_TEXT_MESSAGE = 'Use letters, numbers or signs that show; this has only invisible characters';

/** What text a person types must be: required (its message), at most `max` characters (its message), one line or several. */
export interface TextRule {
  required: string;
  max: number;
  tooLong: string;
  multiline?: boolean;
}

/**
 * What is wrong with typed text under a rule, in the words `typedText` (shared/schemas/text.ts) refuses it
 * with, or null: lets a phone say it before queueing a note, without the schema library.
 * @example textProblem('  ', { required: 'Write something first', max: 500, tooLong: 'Too long' }) // 'Write something first'
 */
export function textProblem(text: string, rule: TextRule): string | null {
  const clean = normaliseText(text, rule.multiline ?? false);
  if (clean.length < 1) return rule.required;
  if (clean.length > rule.max) return rule.tooLong;
  if (!hasVisibleText(clean)) return INVISIBLE_TEXT_MESSAGE;
  return null;
}
