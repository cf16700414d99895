import { ClientError, errorOfBody } from './errors';

/** How the HTTP client gets and renews the access token (set by the session store). */
export interface TokenSource {
  token(): string | null;
  /** Tries to renew the access token; resolves to whether it worked. */
  renew(): Promise<boolean>;
}

let tokens: TokenSource = { token: () => null, renew: async () => false };

/** Plugs the session store into the HTTP client. */
export function useTokenSource(source: TokenSource): void {
  tokens = source;
}

async function send<T>(method: string, path: string, body?: unknown, retry = true, extra: Record<string, string> = {}): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json', ...extra };
  const token = tokens.token();
  if (token) headers.Authorization = `Bearer ${token}`;
  if (body !== undefined) headers['Content-Type'] = 'application/json';
  let res: Response;
  try {
    res = await fetch(`/api${path}`, {
      method,
      headers,
      body: body === undefined ? undefined : JSON.stringify(body),
      credentials: 'same-origin',
    });
  } catch {
    throw new ClientError('network', 'Cairn cannot reach the server; check the connection and try again');
  }
  if (res.status === 401 && retry && token && (await tokens.renew())) {
    return send<T>(method, path, body, false, extra);
  }
  if (res.status === 204) return undefined as T;
  const data = (await res.json().catch(() => null)) as unknown;
  if (!res.ok) throw errorOfBody(res.status, data, `The server answered ${res.status}`);
  return data as T;
}

/** Cairn's typed HTTP client for `/api`. */
export const http = {
  get: <T>(path: string, headers?: Record<string, string>) => send<T>('GET', path, undefined, true, headers),
  post: <T>(path: string, body?: unknown) => send<T>('POST', path, body ?? {}),
  put: <T>(path: string, body: unknown) => send<T>('PUT', path, body),
  patch: <T>(path: string, body: unknown) => send<T>('PATCH', path, body),
  delete: <T = void>(path: string) => send<T>('DELETE', path),
};
