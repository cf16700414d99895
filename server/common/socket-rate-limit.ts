import type { Socket } from 'socket.io';

/** How many events a socket may send in a burst, and how many a second after that. */
export interface EventBudget {
  burst: number;
  perSecond: number;
}

/**
 * Common practice for a phone in a live room: a person taps a few times a second at most, so a
 * burst of 40 and 20 a second leave every honest phone alone and stop a flooding one.
 */
export const PHONE_EVENT_BUDGET: EventBudget = { burst: 40, perSecond: 20 };

/** The tokens left in an event budget and when they were last counted; several sockets may share one. */
export interface TokenBucket {
  tokens: number;
  last: number;
}

/** A full bucket of a budget. */
export function newBucket(budget: EventBudget): TokenBucket {
  return { tokens: budget.burst, last: Date.now() };
}

/**
 * Sockets one participant may hold at once: a phone and a tab or two more (common practice; a phone
 * reconnecting on flaky Wi-Fi may briefly hold a stale socket besides its new one).
 */
export const SOCKETS_PER_PARTICIPANT = 5;

/**
 * Keeps each participant to SOCKETS_PER_PARTICIPANT sockets and one event budget shared by them all,
 * so a participant token cannot multiply its budget by opening more sockets. A socket over the bound
 * closes the participant's oldest (most likely a stale one of a phone that reconnected).
 */
export class ParticipantSockets {
  private held = new Map<string, { sockets: Socket[]; bucket: TokenBucket }>();

  constructor(
    private budget: EventBudget = PHONE_EVENT_BUDGET,
    private max = SOCKETS_PER_PARTICIPANT,
  ) {}

  /** Counts a participant's new socket, closes the oldest over the bound, and throttles it on the shared budget. */
  add(participantId: string, socket: Socket): void {
    let entry = this.held.get(participantId);
    if (!entry) {
      entry = { sockets: [], bucket: newBucket(this.budget) };
      this.held.set(participantId, entry);
    }
    const own = entry;
    own.sockets.push(socket);
    socket.on('disconnect', () => {
      own.sockets = own.sockets.filter((s) => s !== socket);
      if (own.sockets.length === 0 && this.held.get(participantId) === own) this.held.delete(participantId);
    });
    while (own.sockets.length > this.max) own.sockets.shift()!.disconnect(true);
    limitSocketEvents(socket, this.budget, own.bucket);
  }

  /** How many sockets a participant holds now (for tests and figures). */
  count(participantId: string): number {
    return this.held.get(participantId)?.sockets.length ?? 0;
  }
}

/**
 * Throttles the events of one socket with a token bucket: over budget, an event is answered
 * `rate_limited` through its acknowledgement and never reaches a handler, so one flooding phone
 * costs the server almost nothing and the others are not slowed down. Sockets given the same
 * bucket share one budget.
 */
export function limitSocketEvents(socket: Socket, budget: EventBudget = PHONE_EVENT_BUDGET, bucket: TokenBucket = newBucket(budget)): void {
  socket.use((packet, next) => {
    const now = Date.now();
    bucket.tokens = Math.min(budget.burst, bucket.tokens + ((now - bucket.last) / 1000) * budget.perSecond);
    bucket.last = now;
    if (bucket.tokens >= 1) {
      bucket.tokens -= 1;
      next();
      return;
    }
    const ack = packet[packet.length - 1];
    if (typeof ack === 'function') {
      (ack as (a: unknown) => void)({ error: { code: 'rate_limited', message: 'Too many actions at once; wait a moment', reason: 'too_many_actions' } });
    }
  });
}
