import type { LiveCommands } from './live.socket';
import type { PagesService } from './pages.service';
import { LivePayloads } from '../../../shared/events';

/** The projector's page commands on a live socket: projectors say their page, the facilitators turn it. */
export function registerPagesSocket({ on, parse }: LiveCommands, pages: PagesService): void {
  on('pages:show', async (payload, who) => pages.shown(who.sessionId, parse(LivePayloads.pagesShow, payload)));
  on('pages:turn', async (payload, who) => pages.turn(who.sessionId, parse(LivePayloads.pagesTurn, payload)));
  on('pages:get', async (payload, who) => {
    parse(LivePayloads.empty, payload ?? {});
    return pages.lastShown(who.sessionId);
  });
}
