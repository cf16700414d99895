import { z } from 'zod';

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

/** The one error body every route and acknowledgement uses. */
export const ApiErrorBody = z.object({
  error: z.object({
    code: ErrorCode,
    message: z.string(),
    /** Field-by-field problems of a rejected input, keyed by dotted path. */
    fields: z.record(z.string(), z.string()).optional(),
  }),
});
/** The one error body every route and acknowledgement uses. */
export type ApiErrorBody = z.infer<typeof ApiErrorBody>;

/** Turns a zod error into a map of dotted field paths to the first message for each. */
export function fieldErrors(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.map(String).join('.') || '_';
    if (!(key in out)) out[key] = issue.message;
  }
  return out;
}
