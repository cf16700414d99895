import { z } from 'zod';
import { REASON_PARAMS, type ErrorReason as Reason } from './reasons';

export { FACILITATOR_REASONS, PARTICIPANT_REASONS, REASON_PARAMS, because, type ReasonParams, type Why } from './reasons';

/** Every error code Cairn's API and socket acknowledgements can answer with. */
export const ErrorCode = z.enum([
  'bad_request',
  'validation_failed',
  'unauthenticated',
  'token_expired',
  'forbidden',
  'not_found',
  'conflict',
  'rate_limited',
  'payload_too_large',
  'signup_closed',
  'wrong_credentials',
  'session_ended',
  'input_locked',
  'budget_exceeded',
  'cap_exceeded',
  'unsupported_media',
  'internal',
]);
/** An error code, e.g. `'forbidden'`. */
export type ErrorCode = z.infer<typeof ErrorCode>;

/** Values a translated message fills in ("No workshop has the code {code}"). */
export const ErrorParams = z.record(z.string(), z.union([z.string(), z.number()]));
/** Values a translated message fills in. */
export type ErrorParams = z.infer<typeof ErrorParams>;

/** The finer reason behind an error, for a client to say in its own language with `params` (shared/reasons.ts). */
export const ErrorReason = z.enum(Object.keys(REASON_PARAMS) as [Reason, ...Reason[]]);
/** An error's reason, e.g. `'join_code_unknown'`. */
export type ErrorReason = Reason;

/** One rejected field as a code and values, so a client can say it in its own language (`field.<code>` in the catalogs). */
export const FieldIssue = z.object({ code: z.string(), params: ErrorParams.optional() });
/** One rejected field as a code and values. */
export type FieldIssue = z.infer<typeof FieldIssue>;

/** The one error body every route and acknowledgement uses. */
export const ApiErrorBody = z.object({
  error: z.object({
    code: ErrorCode,
    /** English, for logs, the facilitator's screens and clients without catalogs. */
    message: z.string(),
    /** The finer reason, for a client to translate; `code` alone is translated when there is none. */
    reason: ErrorReason.optional(),
    params: ErrorParams.optional(),
    /** Field-by-field problems of a rejected input, keyed by dotted path. */
    fields: z.record(z.string(), z.string()).optional(),
    /** The same problems as codes with values, keyed by the same paths. */
    fieldIssues: z.record(z.string(), FieldIssue).optional(),
  }),
});
/** The one error body every route and acknowledgement uses. */
export type ApiErrorBody = z.infer<typeof ApiErrorBody>;

/**
 * Turns a zod error into a map of dotted field paths to the first issue's code and limits, for a client
 * to word in its own language (`too_small` with `min`, `too_big` with `max`, `invalid_format`, …; a
 * schema's own rule by the reason it names, `{ params: { reason: 'start_before_doors' } }`).
 */
export function fieldIssues(error: z.ZodError): Record<string, FieldIssue> {
  const out: Record<string, FieldIssue> = {};
  for (const issue of error.issues) {
    const key = issue.path.map(String).join('.') || '_';
    if (key in out) continue;
    const params: ErrorParams = {};
    const limits = issue as { minimum?: unknown; maximum?: unknown; origin?: unknown };
    if (typeof limits.minimum === 'number' || typeof limits.minimum === 'bigint') params.min = Number(limits.minimum);
    if (typeof limits.maximum === 'number' || typeof limits.maximum === 'bigint') params.max = Number(limits.maximum);
    if (typeof limits.origin === 'string') params.of = limits.origin;
    // What a value should have been (`int`, `number`) or how it should be written (`email`): the client's words differ.
    const kind = issue as { expected?: unknown; format?: unknown; inclusive?: unknown };
    if (issue.code === 'invalid_type' && typeof kind.expected === 'string') params.expected = kind.expected;
    if (issue.code === 'invalid_format' && typeof kind.format === 'string') params.format = kind.format;
    if ((issue.code === 'too_small' || issue.code === 'too_big') && kind.inclusive === false) params.exclusive = 1;
    // A rule of the schema's own (`refine`) names its message through `params.reason` ("start_before_doors").
    const own = issue.code === 'custom' ? (issue as { params?: { reason?: unknown } }).params?.reason : undefined;
    out[key] = { code: typeof own === 'string' ? own : issue.code, ...(Object.keys(params).length ? { params } : {}) };
  }
  return out;
}

/** Turns a zod error into a map of dotted field paths to the first message for each. */
export function fieldErrors(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.map(String).join('.') || '_';
    if (!(key in out)) out[key] = issue.message;
  }
  return out;
}
