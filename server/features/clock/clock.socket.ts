import type { Socket } from 'socket.io';
import { ClockPing, type ClientToServerEvents, type ServerToClientEvents, type SocketData } from '../../../shared/events';

/** Answers `clock:ping` with the server's receive and send times, for the RFC 5905 offset estimate. */
export function registerClockSocket(
  socket: Socket<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>,
): void {
  socket.on('clock:ping', (payload, ack) => {
    const t2 = Date.now();
    if (typeof ack !== 'function') return;
    const parsed = ClockPing.safeParse(payload);
    if (!parsed.success) {
      ack({ error: { code: 'validation_failed', message: 'clock:ping needs { t1: number }' } });
      return;
    }
    ack({ data: { t1: parsed.data.t1, t2, t3: Date.now() } });
  });
}
