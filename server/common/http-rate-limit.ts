import type { Request, RequestHandler, Response } from 'express';
import { MemoryStore } from 'express-rate-limit';
import type { ErrorReason } from '../../shared/errors';

/**
 * One rate limit on HTTP requests: how many requests of a key a window allows, and what a refused
 * caller is told. Declared once; `limitRequests` checks any number of them in one middleware.
 */
export interface RequestLimit {
  /** The limit's name in the `RateLimit` and `RateLimit-Policy` headers. */
  name: string;
  windowMs: number;
  /** Requests of one key a window allows. */
  limit: (req: Request) => number;
  /** The key a request counts under, or `null` when the limit does not apply to it. */
  key: (req: Request) => string | null;
  /** Only failed requests (status 400 and up) count: a success gives its hit back. */
  failuresOnly?: boolean;
  /** What a refused caller is told (Cairn's error format, code `rate_limited`). */
  message: string;
  reason: ErrorReason;
}

/** A declared limit with the store that counts its keys (express-rate-limit's in-memory store, one per limit). */
export interface CountedLimit extends RequestLimit {
  store: MemoryStore;
}

/** Makes a limit ready to count: its own store for the window. A limit may be checked by several routes and shares its counts between them. */
export function requestLimit(rule: RequestLimit): CountedLimit {
  const store = new MemoryStore();
  store.init({ windowMs: rule.windowMs } as Parameters<MemoryStore['init']>[0]);
  return { ...rule, store };
}

/**
 * One middleware that checks several limits in order, one store call each: a request over any limit
 * is refused (429, the limit's reason, `Retry-After`) and counts in no later limit, as a chain of one
 * express-rate-limit middleware per limit did; `failuresOnly` limits give their hit back when the
 * answer succeeds. The `RateLimit` and `RateLimit-Policy` headers (IETF draft 8) name every limit
 * that applied, in one header each (a chain of limiters appended and hashed a partition key per limit;
 * a room of phones joining at once paid that on every join).
 */
export function limitRequests(limits: CountedLimit[]): RequestHandler {
  return async (req: Request, res: Response, next) => {
    const state: string[] = [];
    const policy: string[] = [];
    /** Keys of the `failuresOnly` limits this request counted in, with when their window resets. */
    let giveBack: { limit: CountedLimit; key: string; resetAt: number }[] | null = null;
    for (const limit of limits) {
      const key = limit.key(req);
      if (key === null) continue;
      const { totalHits, resetTime } = await limit.store.increment(key);
      const max = limit.limit(req);
      const resetAt = resetTime?.getTime() ?? Date.now() + limit.windowMs;
      const resetSec = Math.max(0, Math.ceil((resetAt - Date.now()) / 1000));
      state.push(`"${limit.name}"; r=${Math.max(max - totalHits, 0)}; t=${resetSec}`);
      policy.push(`"${limit.name}"; q=${max}; w=${Math.ceil(limit.windowMs / 1000)}`);
      if (limit.failuresOnly) (giveBack ??= []).push({ limit, key, resetAt });
      if (totalHits > max) {
        // A refusal is a failure: the failures-only limits keep their hits.
        res.setHeader('RateLimit', state.join(', '));
        res.setHeader('RateLimit-Policy', policy.join(', '));
        res.setHeader('Retry-After', String(resetSec));
        res.status(429).json({ error: { code: 'rate_limited', message: limit.message, reason: limit.reason } });
        return;
      }
    }
    if (state.length > 0) {
      res.setHeader('RateLimit', state.join(', '));
      res.setHeader('RateLimit-Policy', policy.join(', '));
    }
    if (giveBack) {
      const counted = giveBack;
      res.once('finish', () => {
        if (res.statusCode >= 400) return;
        const now = Date.now();
        for (const { limit, key, resetAt } of counted) if (now < resetAt) void limit.store.decrement(key);
      });
    }
    next();
  };
}
