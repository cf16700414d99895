import { z } from 'zod';
import type { ErrorCode } from './errors';

/** Every socket command answers through an acknowledgement of this shape. */
export type Ack<T> = { data: T } | { error: { code: ErrorCode; message: string } };

/** Payload of `clock:ping`: the client's send time T1 (ms, its own clock). */
export const ClockPing = z.object({ t1: z.number().finite() });
/** Answer of `clock:ping`: T1 echoed, the server's receive time T2 and send time T3 (RFC 5905 §8). */
export interface ClockPong {
  t1: number;
  t2: number;
  t3: number;
}

/** Events a client sends to the server (commands are `entity:verb`). */
export interface ClientToServerEvents {
  'clock:ping': (payload: z.input<typeof ClockPing>, ack: (answer: Ack<ClockPong>) => void) => void;
}

/** Events the server broadcasts to clients (`entity:verbed`). */
export interface ServerToClientEvents {
  'session:ended': (payload: { reason: string }) => void;
}

/** What the server remembers about each socket once it has authenticated. */
export interface SocketData {
  kind: 'user' | 'participant';
  userId?: string;
  participantId?: string;
  sessionId?: string;
}
