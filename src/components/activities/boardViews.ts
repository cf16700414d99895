import type { ActivityBoard, NoteView } from '../../../shared/schemas/activities';
import { i18n } from '../../i18n';

/** The notes a room would see: not hidden, not merged into another. */
export function visibleNotes(board: ActivityBoard | null): NoteView[] {
  return (board?.notes ?? []).filter((n) => !n.hidden && !n.mergedIntoId);
}

/** One storyboard: whose it is and its frames in story order. */
export interface Story {
  key: string;
  title: string;
  frames: NoteView[];
}

/** A story key's title: the team's name, or the person's when they had no team. */
export function storyTitle(board: ActivityBoard, key: string, frames: NoteView[]): string {
  const team = board.teams.find((t) => t.id === key);
  if (team) return team.name;
  const name = frames.find((f) => f.displayName)?.displayName;
  return name ? i18n.global.t('team.personal', { name }) : i18n.global.t('team.none');
}

/**
 * The storyboards of a board, each with its frames in the stored order and any frame not in it
 * (added since) after them, oldest first; teams in their order, then people without a team.
 */
export function storiesOf(board: ActivityBoard | null): Story[] {
  if (!board) return [];
  const frames = visibleNotes(board).filter((n) => n.kind === 'frame');
  const keys = [...new Set([...board.teams.map((t) => t.id), ...frames.map((f) => f.storyKey)])];
  return keys
    .map((key) => {
      const mine = frames.filter((f) => f.storyKey === key);
      const order = board.frameOrders[key] ?? [];
      const rank = (f: NoteView) => {
        const at = order.indexOf(f.id);
        return at < 0 ? order.length + mine.indexOf(f) : at;
      };
      return { key, title: storyTitle(board, key, mine), frames: [...mine].sort((a, b) => rank(a) - rank(b)) };
    })
    .filter((s) => s.frames.length > 0 || board.teams.some((t) => t.id === s.key));
}

/** The team a person is in, by the board's teams. */
export function teamOf(board: ActivityBoard | null, participantId: string | undefined): { id: string; name: string } | null {
  if (!board || !participantId) return null;
  return board.teams.find((t) => t.memberIds.includes(participantId)) ?? null;
}

/** The team's name, or a plain stand-in when the team is gone. */
export function teamName(board: ActivityBoard | null, teamId: string | null): string {
  if (!teamId) return i18n.global.t('team.none');
  return board?.teams.find((t) => t.id === teamId)?.name ?? i18n.global.t('team.earlier');
}

/** Notes longer than this (characters) may continue in the projector's next column instead of leaving most of a column empty. */
export const LONG_NOTE = 160;
