import type { ErrorRequestHandler, RequestHandler } from 'express';
import { z } from 'zod';
import { because, fieldErrors, fieldIssues, type ErrorCode, type ErrorParams, type ErrorReason, type Why } from '../../shared/errors';
import type { InputRefusal } from '../../shared/input-gate';

export { because, type Why };

/** An error that carries its HTTP status and Cairn error code to the one error format. */
export class AppError extends Error {
  constructor(
    public status: number,
    public code: ErrorCode,
    message: string,
    public fields?: Record<string, string>,
    /** The finer reason a participant's phone translates, and its values. */
    public detail?: { reason?: ErrorReason; params?: ErrorParams; fieldIssues?: ReturnType<typeof fieldIssues> },
  ) {
    super(message);
  }

  /** The error as the one error body's `error` object. */
  body(): { code: ErrorCode; message: string; reason?: ErrorReason; params?: ErrorParams; fields?: Record<string, string>; fieldIssues?: ReturnType<typeof fieldIssues> } {
    return {
      code: this.code,
      message: this.message,
      ...(this.detail?.reason ? { reason: this.detail.reason } : {}),
      ...(this.detail?.params ? { params: this.detail.params } : {}),
      ...(this.fields ? { fields: this.fields } : {}),
      ...(this.detail?.fieldIssues ? { fieldIssues: this.detail.fieldIssues } : {}),
    };
  }
}

/** What a not-found error names, in English for logs; the client says it through `problem.<thing>_missing`. */
const MISSING = {
  workshop: 'That workshop',
  item: 'That agenda item',
  live_session: 'That live session',
  session: 'That session',
  account: 'That account',
  invitation: 'That invitation',
  member: 'That member',
  vote: 'That vote',
  theme: 'That theme',
  notes: 'One of those notes',
  promotion: 'That promotion',
  activity: 'That activity',
  photo: 'That photo',
  dev_inbox: 'The dev inbox',
} as const satisfies Record<string, string>;
/** Something an API call names that may not be found. */
export type Missing = keyof typeof MISSING;

/**
 * Shorthands for the errors every feature raises. The English message is for logs and tests; `why` (a reason
 * from shared/errors.ts with its values, `because('no_cut_to_undo')`) is what a client translates.
 */
export const errors = {
  badRequest: (message: string, why?: Why) => new AppError(400, 'bad_request', message, undefined, why),
  validation: (error: z.ZodError, what = 'The request') =>
    new AppError(400, 'validation_failed', `${what} has fields that need fixing`, fieldErrors(error), { fieldIssues: fieldIssues(error) }),
  unauthenticated: (message = 'Sign in first') => new AppError(401, 'unauthenticated', message),
  forbidden: (message = 'Your role does not allow this', why?: Why) => new AppError(403, 'forbidden', message, undefined, why),
  notFound: (thing: Missing) => new AppError(404, 'not_found', `${MISSING[thing]} was not found`, undefined, because(`${thing}_missing`)),
  conflict: (message: string, why?: Why) => new AppError(409, 'conflict', message, undefined, why),
  /** A participant token whose participant is no longer in the session (removed, data deleted). */
  notInSession: () => new AppError(403, 'forbidden', 'You are not in this session any more; join again', undefined, because('not_in_session')),
  /** A command on a live session that has ended. */
  sessionEnded: () => new AppError(409, 'session_ended', 'This live session has ended'),
  /** A phone's input refused by the input gate (shared/input-gate.ts), with the one message of its code. */
  inputRefused: (why: InputRefusal) => INPUT_REFUSED[why](),
};

const INPUT_REFUSED: Record<InputRefusal, () => AppError> = {
  not_in_session: errors.notInSession,
  session_ended: errors.sessionEnded,
  input_locked: () => new AppError(409, 'input_locked', 'The facilitator has paused answers for now'),
  not_current: () => new AppError(409, 'conflict', 'That activity is not the current one any more; nothing was sent', undefined, { reason: 'note_wrong_activity' }),
};

/** Answers unknown API paths with the one error format. */
export const notFoundHandler: RequestHandler = (_req, res) => {
  res.status(404).json({ error: { code: 'not_found', message: 'No such API route' } });
};

/** The one error format for a request body that body-parser refused, by its status and type. */
function clientError(status: number, type: string | undefined): { code: ErrorCode; message: string } {
  if (status === 415) {
    return {
      code: 'unsupported_media',
      message: type === 'charset.unsupported' ? 'The body uses a character set Cairn does not read' : 'The body uses a content encoding Cairn does not read',
    };
  }
  if (status === 413) return { code: 'payload_too_large', message: 'That is too large to send' };
  return { code: 'bad_request', message: 'The body could not be read' };
}

/** Turns anything thrown into `{ error: { code, message } }` with the right status. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  if (err instanceof AppError) {
    res.status(err.status).json({ error: err.body() });
    return;
  }
  if (err instanceof z.ZodError) {
    res.status(400).json({ error: { code: 'validation_failed', message: 'The request has fields that need fixing', fields: fieldErrors(err), fieldIssues: fieldIssues(err) } });
    return;
  }
  const e = err as { type?: string; status?: number; code?: string };
  if (e.type === 'entity.too.large' || e.code === 'LIMIT_FILE_SIZE') {
    res.status(413).json({ error: { code: 'payload_too_large', message: 'That is too large to send' } });
    return;
  }
  if (e.type === 'entity.parse.failed') {
    res.status(400).json({ error: { code: 'bad_request', message: 'The body is not valid JSON' } });
    return;
  }
  const log = (req as { log?: { error: (o: unknown, m: string) => void; info: (o: unknown, m: string) => void } }).log;
  // body-parser's own refusals (an unknown Content-Encoding or charset, a broken gzip body, an aborted
  // upload) carry their 4xx status and `expose`: the client's mistake, answered as such and logged
  // below error level.
  const status = typeof e.status === 'number' ? e.status : 0;
  if (status >= 400 && status < 500 && (err as { expose?: boolean }).expose) {
    log?.info({ type: e.type, status }, 'refused a malformed request');
    res.status(status).json({ error: clientError(status, e.type) });
    return;
  }
  log?.error({ err }, 'unhandled error');
  res.status(500).json({ error: { code: 'internal', message: 'Something went wrong on the server' } });
};
