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

/**
 * Throttles the events of one socket with a token bucket: over budget, an event is answered
 * `rate_limited` through its acknowledgement and never reaches a handler, so one flooding phone
 * costs the server almost nothing and the others are not slowed down.
 */
export function limitSocketEvents(socket: Socket, budget: EventBudget = PHONE_EVENT_BUDGET): void {
  let tokens = budget.burst;
  let last = Date.now();
  socket.use((packet, next) => {
    const now = Date.now();
    tokens = Math.min(budget.burst, tokens + ((now - last) / 1000) * budget.perSecond);
    last = now;
    if (tokens >= 1) {
      tokens -= 1;
      next();
      return;
    }
    const ack = packet[packet.length - 1];
    if (typeof ack === 'function') {
      (ack as (a: unknown) => void)({ error: { code: 'rate_limited', message: 'Too many actions at once; wait a moment' } });
    }
  });
}
