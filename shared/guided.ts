/**
 * The guided sentences (a point of view, a how might we question): their fields, the sentence they
 * make and the gentle hints the phone shows while they are written. Plain data and functions without
 * the schema library, so a phone's page does not download it; the server's schema of the fields is
 * `guidedFieldsSchema` in shared/schemas/activities.ts.
 */
import { ACTIVITY_LIMITS } from './notes';

/** The two guided sentences. */
export type GuidedKind = 'point_of_view' | 'how_might_we';

/** One field of a guided sentence. */
export interface GuidedField {
  id: string;
  label: string;
  /** What the field's input shows before anything is typed. */
  example: string;
  /** The gentle hint when the field is empty. */
  emptyHint: string;
}

/** A guided sentence: its fields in order and how they read as one sentence. */
export interface GuidedSentence {
  fields: readonly GuidedField[];
  /** The words around the fields, for the phone's preview. */
  compose(fields: Record<string, string>): string;
}

const clean = (s: string | undefined): string => (s ?? '').trim().replace(/\s+/g, ' ');
// The guided fields are parts of one sentence: a trailing full stop or question mark would sit mid-sentence.
const part = (s: string | undefined): string => clean(s).replace(/[.?!]+$/, '');

/**
 * The guided sentences: a point of view (d.school: user + need, as a verb + insight) and a how might
 * we question (published method cards: "How might we [action] for [user] so that [outcome]?").
 */
export const GUIDED_SENTENCES: Record<GuidedKind, GuidedSentence> = {
  point_of_view: {
    fields: [
      { id: 'user', label: 'User', example: 'A new member', emptyHint: 'Who is this about? Name the person, e.g. “a new member”.' },
      { id: 'need', label: 'Needs (a verb)', example: 'to find a free dock near home', emptyHint: 'What do they need to do? Start with a verb, e.g. “to find …”.' },
      { id: 'insight', label: 'Because (insight)', example: 'a full dock ends the first ride badly', emptyHint: 'Why? Add what you learned that makes this need matter.' },
    ],
    compose: (f) => `${part(f.user)} needs ${part(f.need)} because ${part(f.insight)}`,
  },
  how_might_we: {
    fields: [
      { id: 'action', label: 'How might we …', example: 'make unlocking a bike obvious', emptyHint: 'What could we do? Start with a verb, e.g. “make …”, “help …”.' },
      { id: 'user', label: 'for …', example: 'a new member', emptyHint: 'For whom? Name the person it helps.' },
      { id: 'outcome', label: 'so that …', example: 'their first ride starts without help', emptyHint: 'What would change for them? Say the outcome.' },
    ],
    compose: (f) => `How might we ${part(f.action)} for ${part(f.user)} so that ${part(f.outcome)}?`,
  },
};

/**
 * The sentence a guided form makes of its fields.
 * @example composeGuided('how_might_we', { action: 'make docks easy to find', user: 'a new member', outcome: 'the first ride ends well' })
 * // 'How might we make docks easy to find for a new member so that the first ride ends well?'
 */
export function composeGuided(kind: GuidedKind, fields: Record<string, string>): string {
  return GUIDED_SENTENCES[kind].compose(fields);
}

// A need stated as a thing, not a doing (common practice: d.school asks for the need as a verb).
const NOUN_START = /^(a|an|the|more|better|some|less|fewer|easier|faster)\b/i;

/**
 * Gentle hints for each field of a guided sentence, `null` where the field reads well: empty, longer
 * than reads well on a wall, over the limit, a need not said as a verb, or a question that repeats
 * "how might we".
 * @example guidedHints('point_of_view', { user: 'A new member', need: 'a map', insight: '' }).need // 'Say the need as something to do …'
 */
export function guidedHints(kind: GuidedKind, fields: Record<string, string>): Record<string, string | null> {
  const codes = guidedHintCodes(kind, fields);
  const out: Record<string, string | null> = {};
  for (const f of GUIDED_SENTENCES[kind].fields) {
    const code = codes[f.id];
    if (code === 'empty') out[f.id] = f.emptyHint;
    else if (code === 'tooLong') out[f.id] = `Too long to send: keep it under ${ACTIVITY_LIMITS.fieldChars} characters.`;
    else if (code === 'long') out[f.id] = 'A shorter phrase reads better on the wall; try to say it in fewer words.';
    else if (code === 'noun') out[f.id] = 'Say the need as something to do, e.g. “to find a dock” rather than “a map”.';
    else if (code === 'repeat') out[f.id] = 'No need to write “how might we” again: start with what we could do.';
    else out[f.id] = null;
  }
  return out;
}

/** Why a guided sentence's field gets a hint; a phone words it in its participant's language. */
export type GuidedHintCode = 'empty' | 'tooLong' | 'long' | 'noun' | 'repeat';

/**
 * The hint each field of a guided sentence gets, as a code ({@link guidedHints} words them in English),
 * `null` where the field reads well.
 * @example guidedHintCodes('point_of_view', { user: 'A new member', need: 'a map', insight: '' }).need // 'noun'
 */
export function guidedHintCodes(kind: GuidedKind, fields: Record<string, string>): Record<string, GuidedHintCode | null> {
  const out: Record<string, GuidedHintCode | null> = {};
  for (const f of GUIDED_SENTENCES[kind].fields) {
    const value = clean(fields[f.id]);
    if (!value) out[f.id] = 'empty';
    else if (value.length > ACTIVITY_LIMITS.fieldChars) out[f.id] = 'tooLong';
    else if (value.length > ACTIVITY_LIMITS.fieldSoftChars) out[f.id] = 'long';
    else if (kind === 'point_of_view' && f.id === 'need' && NOUN_START.test(value)) out[f.id] = 'noun';
    else if (kind === 'how_might_we' && f.id === 'action' && /^how might we\b/i.test(value)) out[f.id] = 'repeat';
    else out[f.id] = null;
  }
  return out;
}

/** Whether a guided sentence can be sent: every field filled and within the limit (the other hints are advice only). */
export function guidedComplete(kind: GuidedKind, fields: Record<string, string>): boolean {
  return GUIDED_SENTENCES[kind].fields.every((f) => {
    const value = clean(fields[f.id]);
    return value.length > 0 && value.length <= ACTIVITY_LIMITS.fieldChars;
  });
}

