import { dayText, percentText } from '../../../shared/words';
import { typeAndPhase } from '../../../shared/wording';
import { facilitatorWording } from '../../common/catalogs';
import { contributionsText, voteScoreLabel } from '../../../shared/schemas/results';
import { partLabel } from '../../../shared/schemas/activities';
import type { ActivityResult, NoteGroup, NoteResult, ResultSection, WorkshopResults } from '../../../shared/schemas/results';
import { INK, PdfWriter } from './pdf-writer';

/** Local clock time of an instant on this server (the laptop at the venue), as HH:MM. */
function clockOf(ms: number | null): string {
  if (ms === null) return '—';
  const d = new Date(ms);
  return `${String(d.getHours()).padStart(2, '0')}:${String(d.getMinutes()).padStart(2, '0')}`;
}

/** Minutes to one decimal, with a sign for differences. */
function minutes(n: number | null, signed = false): string {
  if (n === null) return '—';
  const s = Number.isInteger(Math.abs(n)) ? String(Math.abs(n)) : Math.abs(n).toFixed(1);
  return n < 0 ? `−${s}` : signed && n > 0 ? `+${s}` : s;
}

/** Writes notes in groups, each group's label in bold. */
function writeGroups(w: PdfWriter, groups: NoteGroup[]): void {
  for (const g of groups) {
    // A group without a label (notes of an activity without teams) needs no heading.
    if (g.label) w.heading(`${g.label} (${g.notes.length})`, 3);
    for (const n of g.notes) w.bullet(noteText(n), n.author);
  }
}

/** A note's text with its quadrant or part when it has one. */
function noteText(n: NoteResult): string {
  return n.part && n.kind !== 'feedback' ? `${partLabel(n.part)}: ${n.text}` : n.text;
}

/** Writes one section of an activity's results. */
function writeSection(w: PdfWriter, s: ResultSection): void {
  if (s.session) w.write(`From ${s.session}`, { size: 9, weight: 'bold', color: INK.teal, gap: 2 });
  switch (s.kind) {
    case 'notes':
      writeGroups(w, s.byTheme.length ? s.byTheme : s.byTeam);
      return;
    case 'feedback':
      for (const g of s.grids) {
        w.heading(`Feedback grid: ${g.teamName}`, 3);
        for (const p of g.parts) {
          w.write(p.label, { size: 9.5, weight: 'bold', color: INK.muted });
          if (p.notes.length === 0) w.write('(nothing noted)', { size: 9.5, color: INK.muted, indent: 16 });
          for (const n of p.notes) w.bullet(n.text, n.author);
        }
      }
      return;
    case 'storyboards':
      for (const b of s.boards) {
        w.heading(`Storyboard: ${b.teamName}`, 3);
        for (const f of b.frames) {
          w.bullet(`${f.position}. ${f.text}`);
          w.picture(f.photoId);
        }
      }
      return;
    case 'photos':
      w.heading(`Photos (${s.photos.filter((p) => p.shown).length})`, 3);
      for (const p of s.photos) {
        if (!p.shown) continue;
        w.bullet(p.caption || '(no caption)', [p.teamName, p.author].filter(Boolean).join(', '));
        w.picture(p.id);
        for (const f of p.feedback) w.write(`Feedback: ${f.text} — ${f.author}`, { size: 9.5, color: INK.muted, indent: 16 });
      }
      if (s.withheld) w.write(`${s.withheld} photo(s) left out: someone in them did not agree to photos being shown.`, { size: 9.5, color: INK.muted });
      return;
    case 'votes': {
      const method = { dots: 'Dot vote', borda: 'Preference vote', schulze: 'Preference vote', first_choices: 'Team sort' }[s.method];
      w.write(`${method}: ${s.voted} of ${s.voters} voted${s.open ? ' (the vote was still open)' : ''}.`, { size: 9.5, color: INK.muted, gap: 2 });
      for (const block of [{ id: undefined as string | undefined, label: s.rankedBy, rows: s.overall }, ...s.tables]) {
        const score = (block.id === undefined ? s.scoreLabel : null) ?? voteScoreLabel(s.method, block.id);
        w.heading(block.label, 3);
        w.table(
          [
            { label: 'Rank', width: 40 },
            { label: 'Option', width: w.contentWidth - 190 },
            { label: score, width: 50 },
            { label: 'Note', width: 100 },
          ],
          block.rows.map((v) => [
            String(v.rank),
            v.label,
            String(v.score),
            [v.quadrant ?? '', v.tied ? 'tied' : v.nearTie ? 'near tie' : '', v.selected ? 'carried forward' : ''].filter(Boolean).join(', '),
          ]),
        );
      }
      if (s.tiePolicy) w.write(s.tiePolicy, { size: 9.5, color: INK.muted, gap: 2 });
      if (s.matrix) {
        w.heading(`Criteria matrix: ${s.matrix.yLabel} against ${s.matrix.xLabel}`, 3);
        w.table(
          [
            { label: 'Option', width: w.contentWidth - 140 },
            { label: s.matrix.yLabel, width: 70 },
            { label: s.matrix.xLabel, width: 70 },
          ],
          s.matrix.points.map((p) => [p.label, String(p.y), String(p.x)]),
        );
      }
      if (s.pairwise) {
        w.heading('Pairwise table: voters who prefer the row to the column', 3);
        const n = s.pairwise.labels.length;
        const cell = Math.min(40, (w.contentWidth - 160) / Math.max(1, n));
        w.table(
          [{ label: 'Option', width: w.contentWidth - cell * n }, ...s.pairwise.labels.map((_, i) => ({ label: String(i + 1), width: cell }))],
          s.pairwise.labels.map((label, i) => [`${i + 1}. ${label}`, ...s.pairwise!.d[i]!.map((v, j) => (i === j ? '—' : String(v)))]),
        );
      }
      return;
    }
    case 'reflections':
      // Reflections and next steps come in one list: the part says which is which, as on the results page.
      for (const n of s.notes) w.bullet(noteText(n), n.author);
      return;
  }
}

/** Writes one activity: its heading, prompt and sections. */
function writeActivity(w: PdfWriter, a: ActivityResult): void {
  w.heading(`${a.position}. ${a.title}`, 2);
  // The type and phase as the console names them, from the facilitator catalogs in the report's language (English).
  w.write(typeAndPhase(facilitatorWording('en'), a.type, a.phase), { size: 9, color: INK.muted });
  if (a.prompt) w.write(a.prompt, { size: 9.5, color: INK.muted, gap: 3 });
  for (const s of a.sections) writeSection(w, s);
}

/**
 * Renders a workshop's results as Cairn's printed report (A4 PDF): the brief, the agenda as run
 * (planned against actual times), each activity's results, teams and challenges, participation and
 * the next steps. Uses the Source Sans 3 shipped with the app; nothing is fetched. `photos` holds the
 * pictures (by photo id) the results may show; others are never printed.
 * @example const pdf = await renderReportPdf(await results.results(id));
 */
export function renderReportPdf(r: WorkshopResults, photos: Map<string, Buffer> = new Map()): Promise<Buffer> {
  const w = new PdfWriter(
    { title: `Workshop report: ${r.workshop.title}`, author: r.workshop.ownerName || 'Cairn', subject: r.workshop.objective.slice(0, 200), createdAt: r.generatedAt },
    photos,
  );

  w.write('Cairn · Workshop report', { size: 10, weight: 'bold', color: INK.teal, gap: 4 });
  w.write(r.workshop.title, { size: 22, weight: 'bold', gap: 4 });
  w.write(
    `${dayText(r.workshop.date, 'en-GB')} · ${r.workshop.window.start}–${r.workshop.window.end} · lead facilitator: ${r.workshop.ownerName}` +
      ` · ${r.participation.joined} ${r.participation.joined === 1 ? 'participant' : 'participants'} joined`,
    { color: INK.muted, gap: 2 },
  );
  if (r.anonymized) w.write('Names are removed from this copy: participants appear as "Participant 1", "Participant 2" …', { size: 9.5, color: INK.muted });
  w.rule();

  w.heading('Brief');
  w.line('Objective', r.workshop.objective);
  if (r.workshop.persona) w.line('The people it is for', r.workshop.persona);

  const covered = r.sessions.filter((s) => s.included);
  w.write(
    covered.length
      ? `Covers ${covered.map((s) => s.name).join('; ')}.`
      : 'Covers no live session: none was chosen, or the workshop has not run as the day yet.',
    { size: 9.5, color: INK.muted, gap: 2 },
  );

  w.heading('Agenda as run');
  w.write('Planned times come from the plan; actual times are when the facilitator started and ended each item, session by session.', { size: 9, color: INK.muted, gap: 4 });
  for (const s of covered.length ? covered : [{ name: 'The plan', agenda: r.agenda }]) {
    if (covered.length) w.heading(s.name, 3);
    w.table(
    [
      { label: '#', width: 22 },
      { label: 'Activity', width: w.contentWidth - 282 },
      { label: 'Planned', width: 70 },
      { label: 'Actual', width: 70 },
      { label: 'Planned minutes', width: 50 },
      { label: 'Actual minutes', width: 40 },
      { label: '±', width: 30 },
    ],
    s.agenda.map((a) => [
      String(a.position),
      a.title,
      `${a.plannedStart}–${a.plannedEnd}`,
      a.actualStart === null ? 'did not run' : `${clockOf(a.actualStart)}–${clockOf(a.actualEnd)}`,
      minutes(a.plannedMin),
      minutes(a.actualMin),
      minutes(a.overMin, true),
    ]),
    );
  }

  w.heading('Results');
  const withResults = r.activities.filter((a) => a.sections.length > 0);
  if (withResults.length === 0) w.write('No notes, votes or photos were collected.', { color: INK.muted });
  for (const a of withResults) writeActivity(w, a);

  w.heading('Teams and their challenges');
  if (r.teams.length === 0) w.write('No teams were formed.', { color: INK.muted });
  for (const t of r.teams) {
    w.heading(`${t.name} (${t.members.length})${covered.length > 1 ? ` · ${t.session}` : ''}`, 3);
    w.write(t.challenge ? `Challenge: ${t.challenge}` : 'No challenge set.', { color: t.challenge ? INK.text : INK.muted });
    if (t.members.length) w.write(t.members.map((m) => m.name).join(', '), { size: 9.5, color: INK.muted, gap: 2 });
  }

  w.heading('Participation');
  const p = r.participation;
  w.write(
    `${p.joined} joined · ${p.withPhotoConsent} agreed to photos · ${p.notesTotal} notes in all · ${p.withAddress} asked for this report by e-mail`,
    { gap: 4 },
  );
  if (p.perActivity.length) {
    w.table(
      [
        { label: 'Activity', width: w.contentWidth - 180 },
        { label: 'Contributions', width: 60 },
        { label: 'Took part', width: 60 },
        { label: 'Share', width: 60 },
      ],
      p.perActivity.map((a) => [a.title, contributionsText(a), String(a.contributors), percentText(a.rate * 100)]),
    );
  }

  w.heading('Next steps');
  if (r.nextSteps.length === 0) w.write('No next steps were noted.', { color: INK.muted });
  for (const n of r.nextSteps) w.bullet(n.text, n.author);

  w.rule();
  w.write(
    "Personal data: this report may hold names and what people said. Share it only as your organisation's " +
      'data-protection policy allows, and delete copies you no longer need.',
    { size: 8.5, color: INK.muted },
  );
  // The workshop, whether names are removed, and the page number at the foot of every page.
  w.footers((page, pages) => `${r.workshop.title} · Cairn workshop report${r.anonymized ? ' · names removed' : ''} · page ${page} of ${pages}`);
  return w.finish();
}
