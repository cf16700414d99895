import type { Server } from 'socket.io';
import { createClient } from 'redis';
import { createAdapter } from '@socket.io/redis-streams-adapter';

/**
 * Shares socket.io broadcasts between several Cairn processes through Redis streams, so a phone
 * connected to one process hears what a facilitator did on another. Returns the closer.
 * @example const stop = await shareBroadcasts(io, 'redis://127.0.0.1:6379')
 */
export async function shareBroadcasts(io: Server, redisUrl: string): Promise<() => Promise<void>> {
  const client = createClient({ url: redisUrl });
  await client.connect();
  io.adapter(createAdapter(client));
  return async () => {
    await client.quit().catch(() => undefined);
  };
}
