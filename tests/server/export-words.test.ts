import { describe, expect, it } from 'vitest';
import { notesTable } from '../../server/features/results/export.service';
import { partLabel } from '../../shared/schemas/activities';
import type { NoteResult, WorkshopResults } from '../../shared/schemas/results';
import { csvWord } from '../shared/english';

// Invented notes from the demo scenario (Harbour Lane Bike Co-op); what each should read as is Cairn's own
// wording: the part labels the phones show, names instead of ids.
const note = (over: Partial<NoteResult>): NoteResult => ({
  id: 'n',
  sessionId: 's1',
  session: 'The day',
  itemId: 'i1',
  participantId: 'p-ana',
  author: 'Ana Lima',
  teamId: null,
  teamName: null,
  kind: 'note',
  part: null,
  text: '',
  fields: null,
  themeId: null,
  themeName: null,
  createdAt: 0,
  ...over,
});

const results = {
  agenda: [{ itemId: 'i1', position: 1, title: 'Interviews', type: 'interview' }],
  participants: [
    { id: 'p-ana', name: 'Ana Lima' },
    { id: 'p-ben', name: 'Ben Okafor' },
  ],
  teams: [{ id: 't-dock', name: 'Team Dock', session: 'The day', challenge: null, members: [] }],
  notes: [
    note({ id: 'a', part: 'says_does', text: 'Rang the bell twice at the dock', fields: { partnerId: 'p-ben', round: '0' } }),
    note({ id: 'b', createdAt: 1, kind: 'reflection', part: 'next_step', text: 'Ride the harbour route on Saturday' }),
    note({ id: 'c', createdAt: 2, kind: 'feedback', part: 'didnt_work', text: 'The map was too small', fields: { hostTeamId: 't-dock', round: '1' } }),
    note({ id: 'd', createdAt: 3, kind: 'sketch', text: 'Welcome card', fields: { photoId: 'ph-123' } }),
    note({ id: 'e', createdAt: 4, kind: 'feedback', text: 'Bigger letters', fields: { sketchId: 'd' } }),
    note({ id: 'f', createdAt: 5, kind: 'point_of_view', text: 'A new member needs…', fields: { user: 'A new member', need: 'to find a dock' } }),
    note({ id: 'g', createdAt: 6, part: 'says', text: 'Partner left early', fields: { partnerId: 'p-gone' } }),
  ],
} as unknown as WorkshopResults;

describe('the notes export speaks the room’s words', () => {
  const { header, rows } = notesTable(results);
  const column = (name: string) => rows.map((r) => r[header.indexOf(name)]);

  it('labels parts as the phones do, never with their ids', () => {
    expect(column(csvWord('part'))).toEqual(['Says & does', 'Next step', "What didn't work", null, null, null, 'Says']);
  });

  it('names the partner and the team tested, counts rounds from 1, and leaves photo ids out', () => {
    expect(column(csvWord('details'))).toEqual([
      `${csvWord('partner', { name: 'Ben Okafor' })}; ${csvWord('round', { n: 1 })}`,
      '',
      `${csvWord('teamTested', { team: 'Team Dock' })}; ${csvWord('round', { n: 2 })}`,
      '',
      csvWord('aboutSketch', { caption: 'Welcome card', author: 'Ana Lima' }),
      'user: A new member; need: to find a dock',
      csvWord('partner', { name: csvWord('partnerGone') }),
    ]);
    expect(JSON.stringify(rows)).not.toMatch(/p-ben|t-dock|ph-123|says_does|next_step/);
  });

  it('reads an unknown part as words, not as an id', () => {
    expect(partLabel('thinks_feels')).toBe('Thinks & feels');
    expect(partLabel('old_part')).toBe('Old part');
  });
});
