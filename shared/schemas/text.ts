import { z } from 'zod';
import { hasVisibleText, INVISIBLE_TEXT_MESSAGE, normaliseText, type TextRule } from '../text';

/**
 * A zod schema for text a person types (a name, a note, a theme's name): normalised with
 * `normaliseText`, then required, bounded and refused when nothing in it shows.
 * @example typedText({ required: 'Enter a name', max: 40, tooLong: 'Keep it under 40 characters' })
 */
export function typedText(opts: TextRule) {
  return z
    .string()
    .overwrite((s) => normaliseText(s, opts.multiline ?? false))
    .min(1, opts.required)
    .max(opts.max, opts.tooLong)
    .refine(hasVisibleText, INVISIBLE_TEXT_MESSAGE);
}
