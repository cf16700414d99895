import { describe, expect, it } from 'vitest';
import { CLOSING_PARTS, EMPATHY_MAP_PARTS, FEEDBACK_GRID_PARTS, INTERVIEW_PARTS, partLabel } from '../../shared/notes';
import {
  ACTIVITY_LIBRARY,
  LIVE_TEAM_TYPES,
  MODERATED_TYPES,
  PAIRED_TYPES,
  PHOTO_TYPES,
  ROUND_TYPES,
  TEAM_TYPES,
  VOTE_KINDS,
  VOTE_TYPES,
  isVoteType,
  notePartsFor,
} from '../../shared/activities';
import { ActivityType } from '../../shared/schemas/agenda-item';
import { SubmissionInput } from '../../shared/schemas/live';
import { VoteKind } from '../../shared/schemas/voting';

describe('the parts notes are filed under', () => {
  it('interviews note what the partner says, thinks, does and feels', () => {
    // Published empathy-map canvases: says / thinks / does / feels.
    expect(notePartsFor('interview', {}).map((p) => p.id)).toEqual(['says', 'thinks', 'does', 'feels']);
    expect(INTERVIEW_PARTS).toHaveLength(4);
  });

  it('an empathy map has sees, hears, says & does, thinks & feels, and pains and gains only when set', () => {
    // Published empathy-map canvases, the variant with sees / hears and pains / gains.
    expect(notePartsFor('empathy_map', {}).map((p) => p.label)).toEqual(['Sees', 'Hears', 'Says & does', 'Thinks & feels']);
    expect(notePartsFor('empathy_map', { painsAndGains: true }).map((p) => p.id)).toEqual([
      ...EMPATHY_MAP_PARTS.map((p) => p.id),
      'pains',
      'gains',
    ]);
  });

  it('the feedback capture grid has four parts, and the closing a reflection and a next step', () => {
    // d.school method card: the feedback capture grid's four quadrants (likes, what to change, questions, ideas).
    expect(FEEDBACK_GRID_PARTS.map((p) => p.label)).toEqual(['What worked', "What didn't work", 'Questions', 'Ideas']);
    expect(notePartsFor('test_rounds', {})).toBe(FEEDBACK_GRID_PARTS);
    expect(notePartsFor('closing', {})).toBe(CLOSING_PARTS);
    expect(notePartsFor('insights', {})).toEqual([]);
  });
});

// Cairn's own rules (no outside reference): one declaration a type in the activity library, every set derived from it.
describe('the activity-type table', () => {
  const defs = ActivityType.options.map((type) => ACTIVITY_LIBRARY[type]);

  it('has an entry for every activity type, under its own name, with every live trait declared', () => {
    expect(Object.keys(ACTIVITY_LIBRARY).sort()).toEqual([...ActivityType.options].sort());
    for (const def of defs) {
      expect(ACTIVITY_LIBRARY[def.type].type).toBe(def.type);
      for (const trait of ['paired', 'rounds', 'teamBoard', 'liveTeamRoom', 'photos', 'moderated', 'vote', 'noteKinds', 'noteParts', 'extraParts'] as const) {
        expect(def[trait], `${def.type}.${trait}`).not.toBeUndefined();
      }
    }
  });

  it('keeps the traits consistent with each other', () => {
    for (const def of defs) {
      const where = def.type;
      // Pairs rotate round by round; a live team room shares a team's board; a photo is a note the type takes.
      if (def.paired) expect(def.rounds, where).toBe(true);
      if (def.liveTeamRoom) expect(def.teamBoard, where).toBe(true);
      if (def.photos) expect(def.noteKinds, where).toContain(def.photos);
      // Moderation is of notes: exactly the types that take notes; a vote takes ballots, never notes.
      expect(def.moderated, where).toBe(def.noteKinds.length > 0);
      if (def.vote) expect(def.noteKinds, where).toEqual([]);
      // A type's vote kind is its own name; parts are for types that take notes.
      if (def.vote) expect(def.vote, where).toBe(def.type);
      if (def.noteParts.length > 0 || def.extraParts) expect(def.moderated, where).toBe(true);
    }
  });

  it('derives the vote kinds and every type set from the library', () => {
    expect([...VoteKind.options]).toEqual([...VOTE_KINDS]);
    expect([...VOTE_TYPES]).toEqual([...VOTE_KINDS]);
    for (const type of ActivityType.options) expect(isVoteType(type), type).toBe(VOTE_KINDS.includes(type as never));
    expect(isVoteType('no_such_type')).toBe(false);
    // Pinned by hand, so a change to the table shows here: the sets as the live session has always used them.
    expect([...PAIRED_TYPES]).toEqual(['icebreaker', 'interview']);
    expect([...ROUND_TYPES]).toEqual(['icebreaker', 'interview', 'test_rounds']);
    expect([...TEAM_TYPES]).toEqual(['empathy_map', 'sketch', 'storyboard', 'test_rounds']);
    expect([...LIVE_TEAM_TYPES]).toEqual(['empathy_map', 'storyboard']);
    expect([...PHOTO_TYPES]).toEqual(['sketch', 'storyboard']);
    expect(ACTIVITY_LIBRARY.sketch.photos).toBe('sketch');
    expect(ACTIVITY_LIBRARY.storyboard.photos).toBe('frame');
    expect([...MODERATED_TYPES]).toEqual([
      'interview', 'empathy_map', 'insights', 'point_of_view', 'how_might_we', 'sketch', 'storyboard', 'test_rounds', 'closing',
    ]);
  });

  it('lets every kind of note a phone can send go to some activity', () => {
    const taken = new Set(defs.flatMap((d) => d.noteKinds));
    expect([...taken].sort()).toEqual([...SubmissionInput.shape.kind.options].sort());
  });

  it('gives every note part an id of its own across the library, so a part names itself in the results', () => {
    const parts = defs.flatMap((d) => [...d.noteParts, ...(d.extraParts?.parts ?? [])]);
    const ids = parts.map((p) => p.id);
    expect(new Set(ids).size).toBe(ids.length);
    for (const p of parts) expect(partLabel(p.id)).toBe(p.label);
  });
});
