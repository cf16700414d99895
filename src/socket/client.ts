import { io, type Socket } from 'socket.io-client';
import type { Ack, ClientToServerEvents, Command, CommandAnswer, CommandPayload, ServerToClientEvents } from '../../shared/events';

/** Cairn's typed socket: the server's broadcasts in, commands out. */
export type CairnSocket = Socket<ServerToClientEvents, ClientToServerEvents>;

/**
 * A socket to the Cairn server with a token (an account's access token or a participant token), not yet
 * connecting: `socket.connect()` opens it (the live store does so in a task of its own, after the screen that
 * asked for it has been drawn). Reconnects with exponential backoff and jitter, so a room of phones does not
 * come back all at once.
 */
export function connectSocket(token: () => string | null): CairnSocket {
  return io({
    auth: (cb) => cb({ token: token() }),
    transports: ['websocket', 'polling'],
    reconnectionDelay: 500,
    reconnectionDelayMax: 8000,
    randomizationFactor: 0.5,
    autoConnect: false,
  });
}

/** What `emitWithAck` needs of a socket (a socket with a timeout set is one). */
interface AckEmitter {
  emitWithAck(event: string, payload: unknown): Promise<unknown>;
}

/**
 * Sends a command and resolves with its acknowledgement. Typed by the command table; socket.io's
 * own typing cannot follow a command name that is a type parameter, so the emit is made untyped here, once.
 */
export function emitCommand<E extends Command>(socket: AckEmitter, event: E, payload: CommandPayload<E> | undefined): Promise<Ack<CommandAnswer<E>>> {
  return socket.emitWithAck(event, payload ?? {}) as Promise<Ack<CommandAnswer<E>>>;
}
