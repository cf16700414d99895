import { z } from 'zod';
import { countOf } from '../words';
import { COUNTS, PERCENTS } from '../field-nouns';

export { COUNTS, PERCENTS };

/**
 * Validation messages written for a person, in one place: every zod schema that gives no message of its
 * own says what is wrong and what to do ("Enter at least 1 team"), never a schema's words ("Too small:
 * expected number to be >=1"). `installMessages()` makes them zod's messages; the server's app and the
 * client's entry call it once.
 */

// A number with the noun its field counts, or a percentage, or the number alone.
function amount(field: string | undefined, n: number | bigint): string {
  const value = Number(n);
  if (field && PERCENTS.has(field)) return `${value}\u00a0%`;
  const noun = field ? COUNTS[field] : undefined;
  return noun ? countOf(value, noun) : String(value);
}

/** The message for one zod issue, written for a person; `undefined` keeps zod's own (never reached in practice). */
export function messageFor(issue: z.core.$ZodRawIssue): string {
  const last = issue.path?.at(-1);
  const field = typeof last === 'string' ? last : undefined;
  const missing = issue.input === undefined || issue.input === null || issue.input === '';
  switch (issue.code) {
    case 'too_small': {
      const min = issue.minimum as number | bigint;
      if (issue.origin === 'string') return Number(min) <= 1 ? 'Fill this in' : `Use at least ${countOf(Number(min), 'character')}`;
      if (issue.origin === 'array' || issue.origin === 'set') return `Add at least ${countOf(Number(min), field && COUNTS[field] ? COUNTS[field] : 'item')}`;
      if (Number(min) === 0 && issue.inclusive !== false) return 'Enter a number that is not negative';
      return issue.inclusive === false ? `Enter more than ${amount(field, min)}` : `Enter at least ${amount(field, min)}`;
    }
    case 'too_big': {
      const max = issue.maximum as number | bigint;
      if (issue.origin === 'string') return `Keep this to ${countOf(Number(max), 'character')} or fewer`;
      if (issue.origin === 'array' || issue.origin === 'set') return `Keep this to ${countOf(Number(max), field && COUNTS[field] ? COUNTS[field] : 'item')} or fewer`;
      return issue.inclusive === false ? `Enter less than ${amount(field, max)}` : `Enter at most ${amount(field, max)}`;
    }
    case 'invalid_type':
      if (missing) return 'Fill this in';
      switch (issue.expected) {
        case 'int':
          return 'Enter a whole number';
        case 'number':
          return typeof issue.input === 'number' ? 'Enter a number Cairn can count with' : 'Enter a number';
        case 'string':
          return 'Enter some text';
        case 'boolean':
          return 'Choose yes or no';
        case 'array':
          return 'Give a list here';
        default:
          return 'This is not something Cairn can use here';
      }
    case 'invalid_format':
      switch (issue.format) {
        case 'email':
          return 'Enter an e-mail address, such as name@example.org';
        case 'url':
          return 'Enter a web address, such as https://example.org';
        case 'uuid':
        case 'guid':
          return 'This does not name anything Cairn knows';
        default:
          return 'This is not written the way Cairn expects';
      }
    case 'not_multiple_of':
      return `Enter a multiple of ${String(issue.divisor)}`;
    case 'invalid_value':
      return issue.values.length === 1 ? `Use ${String(issue.values[0])} here` : `Choose one of: ${issue.values.map(String).join(', ')}`;
    case 'unrecognized_keys':
      return issue.keys.length === 1 ? `Leave out “${issue.keys[0]}”: Cairn does not use it` : `Leave out ${issue.keys.map((k) => `“${k}”`).join(', ')}: Cairn does not use them`;
    case 'invalid_union':
    case 'invalid_key':
    case 'invalid_element':
    case 'custom':
    default:
      return 'This is not something Cairn can use here';
  }
}

/**
 * Makes `messageFor` zod's message for every issue whose schema gives none; safe to call more than once.
 * @example installMessages(); z.object({ teamCount: z.number().min(1) }).safeParse({ teamCount: 0 }) // "Enter at least 1 team"
 */
export function installMessages(): void {
  z.config({ customError: (issue) => messageFor(issue) });
}
