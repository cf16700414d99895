// No zod here: the phone's and the facilitator's screens read this to word the names Cairn gives.

/** A name Cairn gave rather than a person: a team numbered when teams are formed, a participant numbered once names are deleted. */
export type MadeName = { kind: 'team' | 'participant'; n: number };

/**
 * The stored form of a name Cairn gives (English, as the database, the exports, the report and API clients
 * keep it); every screen words it from its catalog (`madeName.<kind>`) by {@link madeNameOf}.
 * @example madeName('team', 3) // 'Team 3'
 */
export function madeName(kind: MadeName['kind'], n: number): string {
  return kind === 'team' ? `Team ${n}` : `Participant ${n}`;
}

/**
 * A stored name read back as the name Cairn gave it, or `null` for a name a person chose ("Team Dock").
 * @example madeNameOf('Participant 12') // { kind: 'participant', n: 12 }
 */
export function madeNameOf(name: string): MadeName | null {
  const m = /^(Team|Participant) ([1-9]\d{0,5})$/.exec(name);
  if (!m) return null;
  return { kind: m[1] === 'Team' ? 'team' : 'participant', n: Number(m[2]) };
}
