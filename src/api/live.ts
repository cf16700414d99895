import { http } from './http';
import { ClientError } from './errors';
import type { JoinAnswer, JoinBody, JoinInfo, LiveSessionInfo, SessionKind, SessionSummary } from '../../shared/schemas/live';

const w = (id: string) => `/workshops/${encodeURIComponent(id)}`;

/** Live-session calls: start, look up, stop, join. */
export const liveApi = {
  start: (workshopId: string, kind: SessionKind) => http.post<LiveSessionInfo>(`${w(workshopId)}/live`, { kind }),
  /** The workshop's sessions, oldest first, with what each holds. */
  sessions: (workshopId: string) => http.get<SessionSummary[]>(`${w(workshopId)}/sessions`),
  setKind: (workshopId: string, sessionId: string, kind: SessionKind) =>
    http.put<SessionSummary>(`${w(workshopId)}/sessions/${encodeURIComponent(sessionId)}`, { kind }),
  discard: (workshopId: string, sessionId: string) =>
    http.post<void>(`${w(workshopId)}/sessions/${encodeURIComponent(sessionId)}/discard`, { confirm: true }),
  current: (workshopId: string) => http.get<LiveSessionInfo | null>(`${w(workshopId)}/live`),
  stop: (workshopId: string) => http.post<void>(`${w(workshopId)}/live/stop`),
  // The device id lets the server limit wrong codes per phone, not per room (a room shares one address).
  joinInfo: (code: string, device: string) => http.get<JoinInfo>(`/join/${encodeURIComponent(code)}`, { 'X-Cairn-Device': device }),
  join: (code: string, body: JoinBody) => http.post<JoinAnswer>(`/join/${encodeURIComponent(code)}`, body),
  /** The join QR code as an object URL (fetched with a token, since an <img> cannot send one). */
  async qrObjectUrl(workshopId: string, token: string): Promise<string> {
    const res = await fetch(`/api${w(workshopId)}/live/qr.png`, { headers: { Authorization: `Bearer ${token}` } });
    if (!res.ok) throw new ClientError('internal', 'The join QR code could not be loaded', res.status);
    return URL.createObjectURL(await res.blob());
  },
};
