import type { SocketCommands } from '../../common/command';
import type { PagesService } from './pages.service';

/** The projector's page commands: projectors say their page, the facilitators turn it. */
export function registerPagesSocket(commands: SocketCommands, pages: PagesService): void {
  commands.add('pages:show', ({ who, payload }) => pages.shown(who.sessionId, payload));
  commands.add('pages:turn', ({ who, payload }) => pages.turn(who.sessionId, payload));
  commands.add('pages:get', ({ who }) => pages.lastShown(who.sessionId));
}
