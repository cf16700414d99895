import type { ApiErrorBody, ErrorCode, ErrorParams, ErrorReason, FieldIssue } from '../../shared/errors';
import type { BallotErrorCode } from '../../shared/tally';

/** What a client error's code may be: the server's codes, a ballot's own check, or the two the client makes itself. */
export type ClientErrorCode = ErrorCode | BallotErrorCode | 'network' | 'timeout';

/**
 * The one error the client throws for what the server (over HTTP or a socket) refused or never
 * answered: its code from `shared/errors.ts` (or `network`, `timeout`), a message fit for a person,
 * the HTTP status (0 over a socket or without an answer) and field-by-field problems.
 * @example throw new ClientError('network', 'Cairn cannot reach the server');
 */
export class ClientError extends Error {
  constructor(
    public code: ClientErrorCode,
    message: string,
    public status = 0,
    public fields: Record<string, string> = {},
    /** The finer reason, its values and the fields as codes, for a phone to say in its own language (src/i18n/errors.ts). */
    public detail: { reason?: ErrorReason; params?: ErrorParams; fieldIssues?: Record<string, FieldIssue> } = {},
  ) {
    super(message);
    this.name = 'ClientError';
  }

  /** The request may never have arrived or its answer was lost: sending it again (same client id) is safe. */
  get lost(): boolean {
    return this.code === 'network' || this.code === 'timeout';
  }
}

/**
 * Anything a call threw, as the one client error: a client error as it is, anything else (a programming
 * error, whose text is not for the person using the screen) as an `internal` error with the fallback message.
 * @example error.value = clientErrorOf(err, 'Could not load the workshops');
 */
export function clientErrorOf(err: unknown, fallback: string): ClientError {
  return err instanceof ClientError ? err : new ClientError('internal', fallback);
}

/** The server's error body `{ error: { code, message, reason?, params?, fields?, fieldIssues? } }` of a failed HTTP answer (already read), as a client error. */
export function errorOfBody(status: number, body: unknown, fallback: string): ClientError {
  const e = (body as { error?: Partial<ApiErrorBody['error']> } | null)?.error;
  return new ClientError(e?.code ?? 'internal', e?.message ?? fallback, status, e?.fields ?? {}, {
    reason: e?.reason,
    params: e?.params,
    fieldIssues: e?.fieldIssues,
  });
}

/** The server's error body of a failed HTTP answer, as a client error. */
export async function errorOfResponse(res: Response, fallback: string): Promise<ClientError> {
  return errorOfBody(res.status, await res.json().catch(() => null), fallback);
}
