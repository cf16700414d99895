import type { SocketCommands } from '../../common/command';

/** Answers `clock:ping` with the server's receive and send times, for the RFC 5905 offset estimate. */
export function registerClockSocket(commands: SocketCommands): void {
  commands.add('clock:ping', ({ payload }) => {
    // The registry runs an `any` command at once on receipt, so this is the receive time.
    const t2 = Date.now();
    return { t1: payload.t1, t2, t3: Date.now() };
  });
}
