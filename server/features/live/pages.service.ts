import { liveRooms } from './live.service';
import type { Announcer } from '../../common/announcer';
import type { PagesShown, PagesTurn } from '../../../shared/events';

/** At most this many sessions' pages are remembered (a process runs a handful of live sessions at once). */
const REMEMBERED = 500;

/**
 * The projector's pages, between the projectors and the console: a projector says which page of a
 * paged view it shows, the console hears it ("page 2 of 5") and asks the projectors to turn. Nothing
 * is stored: a projector says its page again at every turn (by itself every few seconds), and the
 * last one said is kept in memory only so a console opened meanwhile shows it at once.
 */
export class PagesService {
  private readonly last = new Map<string, PagesShown>();

  constructor(private announcer: Announcer) {}

  /** A projector shows this page: the session's facilitators hear it. */
  shown(sessionId: string, shown: PagesShown): PagesShown {
    this.last.delete(sessionId);
    this.last.set(sessionId, shown);
    if (this.last.size > REMEMBERED) this.last.delete(this.last.keys().next().value!);
    this.announcer.announce(liveRooms.facilitators(sessionId), 'pages:shown', shown);
    return shown;
  }

  /** The console turns the page: the session's screens hear it; answers with the page shown last, if any. */
  turn(sessionId: string, turn: PagesTurn): PagesShown | null {
    this.announcer.announce(liveRooms.screens(sessionId), 'pages:turned', turn);
    return this.lastShown(sessionId);
  }

  /** The page a projector of the session said it shows last (null when none has). */
  lastShown(sessionId: string): PagesShown | null {
    return this.last.get(sessionId) ?? null;
  }
}
