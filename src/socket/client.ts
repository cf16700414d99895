import { io, type Socket } from 'socket.io-client';
import type { ClientToServerEvents, ServerToClientEvents } from '../../shared/events';

/** Cairn's typed socket: the server's broadcasts in, commands out. */
export type CairnSocket = Socket<ServerToClientEvents, ClientToServerEvents>;

/**
 * Opens a socket to the Cairn server with a token (an account's access token or a participant token).
 * Reconnects with exponential backoff and jitter, so a room of phones does not come back all at once.
 */
export function connectSocket(token: () => string | null): CairnSocket {
  return io({
    auth: (cb) => cb({ token: token() }),
    transports: ['websocket', 'polling'],
    reconnectionDelay: 500,
    reconnectionDelayMax: 8000,
    randomizationFactor: 0.5,
  });
}
