import { http, ApiError } from './http';
import type { JoinAnswer, JoinBody, JoinInfo, LiveSessionInfo } from '../../shared/schemas/live';

const w = (id: string) => `/workshops/${encodeURIComponent(id)}`;

/** Live-session calls: start, look up, stop, join. */
export const liveApi = {
  start: (workshopId: string) => http.post<LiveSessionInfo>(`${w(workshopId)}/live`),
  current: (workshopId: string) => http.get<LiveSessionInfo | null>(`${w(workshopId)}/live`),
  stop: (workshopId: string) => http.post<void>(`${w(workshopId)}/live/stop`),
  // The device id lets the server limit wrong codes per phone, not per room (a room shares one address).
  joinInfo: (code: string, device: string) => http.get<JoinInfo>(`/join/${encodeURIComponent(code)}`, { 'X-Cairn-Device': device }),
  join: (code: string, body: JoinBody) => http.post<JoinAnswer>(`/join/${encodeURIComponent(code)}`, body),
  /** The join QR code as an object URL (fetched with a token, since an <img> cannot send one). */
  async qrObjectUrl(workshopId: string, token: string): Promise<string> {
    const res = await fetch(`/api${w(workshopId)}/live/qr.png`, { headers: { Authorization: `Bearer ${token}` } });
    if (!res.ok) throw new ApiError(res.status, 'internal', 'The join QR code could not be loaded');
    return URL.createObjectURL(await res.blob());
  },
};
