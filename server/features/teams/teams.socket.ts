import type { SocketCommands } from '../../common/command';
import type { TeamsService } from './teams.service';

/** Team commands: every screen lists, the facilitators form and set. */
export function registerTeamsSocket(commands: SocketCommands, teams: TeamsService): void {
  commands.add('teams:list', ({ who }) => teams.list(who.sessionId));
  commands.add('teams:form', ({ who, payload }) => teams.form(who.sessionId, payload.count));
  commands.add('teams:set', ({ who, payload }) => teams.set(who.sessionId, payload));
}
