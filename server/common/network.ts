import os from 'node:os';
import type { Config } from '../config/env';

/**
 * The first IPv4 address of this machine on a local network (not loopback), or null.
 * A laptop at a venue with no internet is reached by phones on the room's Wi-Fi at this address.
 */
export function localNetworkAddress(): string | null {
  for (const addrs of Object.values(os.networkInterfaces())) {
    for (const a of addrs ?? []) {
      if (a.family === 'IPv4' && !a.internal) return a.address;
    }
  }
  return null;
}

/** The base URL phones join at: PUBLIC_URL when set, else this machine's local network address. */
export function joinBaseUrl(config: Config): string {
  if (config.publicUrl) return config.publicUrl.replace(/\/$/, '');
  const host = localNetworkAddress() ?? 'localhost';
  return `http://${host}:${config.port}`;
}

/**
 * The base URL of every link in an e-mail (password reset, invitation, report): PUBLIC_URL, else the
 * local network address phones join at. Never taken from a request's Host or X-Forwarded-* headers,
 * which whoever sends the request chooses.
 */
export function mailLinkBase(config: Config): string {
  return joinBaseUrl(config);
}
