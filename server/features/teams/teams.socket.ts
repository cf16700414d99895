import type { LiveCommands } from '../live/live.socket';
import type { TeamsService } from './teams.service';
import { LivePayloads } from '../../../shared/events';
import { FormTeamsPayload, SetTeamsPayload } from '../../../shared/schemas/team';

/** Team commands on a live socket: every screen lists, the facilitators form and set. */
export function registerTeamsSocket({ on, parse }: LiveCommands, teams: TeamsService): void {
  on('teams:list', async (payload, who) => {
    parse(LivePayloads.empty, payload ?? {});
    return teams.list(who.sessionId);
  });
  on('teams:form', async (payload, who) => teams.form(who.sessionId, parse(FormTeamsPayload, payload).count));
  on('teams:set', async (payload, who) => teams.set(who.sessionId, parse(SetTeamsPayload, payload)));
}
