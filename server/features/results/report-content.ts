import { dayText, percentText } from '../../../shared/words';
import { typeAndPhase } from '../../../shared/wording';
import { RESULTS_FILE_LOCALE, facilitatorWording, nameIn } from '../../common/catalogs';
import type { Locale } from '../../../shared/locales';
import type { Wording } from '../../../shared/wording';
import { partLabel } from '../../../shared/schemas/activities';
import type { ActivityResult, NoteGroup, NoteResult, ResultSection, WorkshopResults } from '../../../shared/schemas/results';
import { INK, PdfWriter } from './pdf-writer';

// Every fixed word of the report comes from the facilitator catalogs' `reportFile.pdf` in the report's language.
/** A report word: `reportFile.pdf.<key>` in the wording's language. */
const say = (l: Wording, key: string, params: Record<string, string | number> = {}, plural?: number): string => l.t(`reportFile.pdf.${key}`, params, plural);

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
function writeGroups(w: PdfWriter, l: Wording, groups: NoteGroup[]): void {
  for (const g of groups) {
    // A group without a label (notes of an activity without teams) needs no heading.
    if (g.label) w.heading(`${nameIn(l, g.label)} (${l.num(g.notes.length)})`, 3);
    for (const n of g.notes) w.bullet(noteText(n), nameIn(l, n.author));
  }
}

/** A note's text with its quadrant or part when it has one. */
function noteText(n: NoteResult): string {
  return n.part && n.kind !== 'feedback' ? `${partLabel(n.part)}: ${n.text}` : n.text;
}

/** Writes one section of an activity's results. */
function writeSection(w: PdfWriter, l: Wording, s: ResultSection): void {
  if (s.session) w.write(say(l, 'fromSession', { session: s.session }), { size: 9, weight: 'bold', color: INK.teal, gap: 2 });
  switch (s.kind) {
    case 'notes':
      writeGroups(w, l, s.byTheme.length ? s.byTheme : s.byTeam);
      return;
    case 'feedback':
      for (const g of s.grids) {
        w.heading(say(l, 'feedbackGrid', { team: nameIn(l, g.teamName) }), 3);
        for (const p of g.parts) {
          w.write(p.label, { size: 9.5, weight: 'bold', color: INK.muted });
          if (p.notes.length === 0) w.write(say(l, 'nothingNoted'), { size: 9.5, color: INK.muted, indent: 16 });
          for (const n of p.notes) w.bullet(n.text, nameIn(l, n.author));
        }
      }
      return;
    case 'storyboards':
      for (const b of s.boards) {
        w.heading(say(l, 'storyboard', { team: nameIn(l, b.teamName) }), 3);
        for (const f of b.frames) {
          w.bullet(`${f.position}. ${f.text}`);
          w.picture(f.photoId);
        }
      }
      return;
    case 'photos':
      w.heading(say(l, 'photos', { n: l.num(s.photos.filter((p) => p.shown).length) }), 3);
      for (const p of s.photos) {
        if (!p.shown) continue;
        w.bullet(p.caption || say(l, 'noCaption'), [p.teamName, p.author].filter(Boolean).map((name) => nameIn(l, name!)).join(', '));
        w.picture(p.id);
        for (const f of p.feedback) w.write(say(l, 'photoFeedback', { text: f.text, author: nameIn(l, f.author) }), { size: 9.5, color: INK.muted, indent: 16 });
      }
      if (s.withheld) w.write(say(l, 'withheld', { n: l.num(s.withheld) }, s.withheld), { size: 9.5, color: INK.muted });
      return;
    case 'votes': {
      const method = say(l, `method.${s.method}`);
      w.write(say(l, s.open ? 'votedOpen' : 'voted', { method, voted: l.num(s.voted), voters: l.num(s.voters) }), { size: 9.5, color: INK.muted, gap: 2 });
      for (const block of [{ id: undefined as string | undefined, label: s.rankedBy, rows: s.overall }, ...s.tables]) {
        // What the score column counts, in the words the results page uses (src/components/results/VoteSection.vue):
        // a Borda table counts points and a Schulze table wins, whichever carries the options forward.
        const by = block.id === 'borda' || block.id === 'schulze' ? block.id : s.method;
        const score =
          block.id === undefined && s.scoreCriterion ? l.t('resultWords.criterionDots', { criterion: s.scoreCriterion }) : l.t(`resultSections.score.${by}`);
        w.heading(block.label, 3);
        w.table(
          [
            { label: say(l, 'rank'), width: 40 },
            { label: say(l, 'option'), width: w.contentWidth - 190 },
            { label: score, width: 50 },
            { label: say(l, 'remark'), width: 100 },
          ],
          block.rows.map((v) => [
            String(v.rank),
            v.label,
            String(v.score),
            [v.quadrant ?? '', v.tied ? say(l, 'tied') : v.nearTie ? say(l, 'nearTie') : '', v.selected ? say(l, 'carriedForward') : ''].filter(Boolean).join(', '),
          ]),
        );
      }
      if (s.tiePolicy) w.write(s.tiePolicy, { size: 9.5, color: INK.muted, gap: 2 });
      if (s.matrix) {
        w.heading(say(l, 'matrix', { y: s.matrix.yLabel, x: s.matrix.xLabel }), 3);
        w.table(
          [
            { label: say(l, 'option'), width: w.contentWidth - 140 },
            { label: s.matrix.yLabel, width: 70 },
            { label: s.matrix.xLabel, width: 70 },
          ],
          s.matrix.points.map((p) => [p.label, String(p.y), String(p.x)]),
        );
      }
      if (s.pairwise) {
        w.heading(say(l, 'pairwise'), 3);
        const n = s.pairwise.labels.length;
        const cell = Math.min(40, (w.contentWidth - 160) / Math.max(1, n));
        w.table(
          [{ label: say(l, 'option'), width: w.contentWidth - cell * n }, ...s.pairwise.labels.map((_, i) => ({ label: String(i + 1), width: cell }))],
          s.pairwise.labels.map((label, i) => [`${i + 1}. ${label}`, ...s.pairwise!.d[i]!.map((v, j) => (i === j ? '—' : String(v)))]),
        );
      }
      return;
    }
    case 'reflections':
      // Reflections and next steps come in one list: the part says which is which, as on the results page.
      for (const n of s.notes) w.bullet(noteText(n), nameIn(l, n.author));
      return;
  }
}

/** Writes one activity: its heading, prompt and sections. */
function writeActivity(w: PdfWriter, l: Wording, a: ActivityResult): void {
  w.heading(`${a.position}. ${a.title}`, 2);
  // The type and phase as the console names them, from the facilitator catalogs in the report's language.
  w.write(typeAndPhase(l, a.type, a.phase), { size: 9, color: INK.muted });
  if (a.prompt) w.write(a.prompt, { size: 9.5, color: INK.muted, gap: 3 });
  for (const s of a.sections) writeSection(w, l, s);
}

/**
 * Renders a workshop's results as Cairn's printed report (A4 PDF): the brief, the agenda as run
 * (planned against actual times), each activity's results, teams and challenges, participation and
 * the next steps. Uses the Source Sans 3 shipped with the app; nothing is fetched. `photos` holds the
 * pictures (by photo id) the results may show; others are never printed. Every fixed word is the facilitator
 * catalogs' (`reportFile.pdf`) in `locale`, English unless asked ({@link RESULTS_FILE_LOCALE}).
 * @example const pdf = await renderReportPdf(await results.results(id));
 */
export function renderReportPdf(r: WorkshopResults, photos: Map<string, Buffer> = new Map(), locale: Locale = RESULTS_FILE_LOCALE): Promise<Buffer> {
  const l = facilitatorWording(locale);
  const w = new PdfWriter(
    { title: say(l, 'docTitle', { title: r.workshop.title }), author: r.workshop.ownerName || 'Cairn', subject: r.workshop.objective.slice(0, 200), createdAt: r.generatedAt },
    photos,
  );

  w.write(say(l, 'overline'), { size: 10, weight: 'bold', color: INK.teal, gap: 4 });
  w.write(r.workshop.title, { size: 22, weight: 'bold', gap: 4 });
  const joined = r.participation.joined;
  w.write(
    say(l, 'byline', {
      // British English writes the day first ("13 March 2027"), as the report always has.
      date: dayText(r.workshop.date, locale === 'en' ? 'en-GB' : locale),
      start: r.workshop.window.start,
      end: r.workshop.window.end,
      lead: r.workshop.ownerName,
      joined: say(l, 'joined', { n: l.num(joined) }, joined),
    }),
    { color: INK.muted, gap: 2 },
  );
  if (r.anonymized) {
    const made = (n: number) => l.t('madeName.participant', { n: l.num(n) });
    w.write(say(l, 'anonymized', { first: made(1), second: made(2) }), { size: 9.5, color: INK.muted });
  }
  w.rule();

  w.heading(say(l, 'brief'));
  w.line(say(l, 'objective'), r.workshop.objective);
  if (r.workshop.persona) w.line(say(l, 'persona'), r.workshop.persona);

  const covered = r.sessions.filter((s) => s.included);
  w.write(
    covered.length ? say(l, 'covers', { list: covered.map((s) => s.name).join('; ') }) : say(l, 'coversNone'),
    { size: 9.5, color: INK.muted, gap: 2 },
  );

  w.heading(say(l, 'agenda'));
  w.write(say(l, 'agendaNote'), { size: 9, color: INK.muted, gap: 4 });
  for (const s of covered.length ? covered : [{ name: say(l, 'thePlan'), agenda: r.agenda }]) {
    if (covered.length) w.heading(s.name, 3);
    w.table(
    [
      { label: say(l, 'number'), width: 22 },
      { label: say(l, 'activity'), width: w.contentWidth - 282 },
      { label: say(l, 'planned'), width: 70 },
      { label: say(l, 'actual'), width: 70 },
      { label: say(l, 'plannedMinutes'), width: 50 },
      { label: say(l, 'actualMinutes'), width: 40 },
      { label: say(l, 'difference'), width: 30 },
    ],
    s.agenda.map((a) => [
      String(a.position),
      a.title,
      `${a.plannedStart}–${a.plannedEnd}`,
      a.actualStart === null ? say(l, 'notRun') : `${clockOf(a.actualStart)}–${clockOf(a.actualEnd)}`,
      minutes(a.plannedMin),
      minutes(a.actualMin),
      minutes(a.overMin, true),
    ]),
    );
  }

  w.heading(say(l, 'results'));
  const withResults = r.activities.filter((a) => a.sections.length > 0);
  if (withResults.length === 0) w.write(say(l, 'noResults'), { color: INK.muted });
  for (const a of withResults) writeActivity(w, l, a);

  w.heading(say(l, 'teams'));
  if (r.teams.length === 0) w.write(say(l, 'noTeams'), { color: INK.muted });
  for (const t of r.teams) {
    w.heading(`${nameIn(l, t.name)} (${l.num(t.members.length)})${covered.length > 1 ? ` · ${t.session}` : ''}`, 3);
    w.write(t.challenge ? say(l, 'challenge', { challenge: t.challenge }) : say(l, 'noChallenge'), { color: t.challenge ? INK.text : INK.muted });
    if (t.members.length) w.write(t.members.map((m) => nameIn(l, m.name)).join(', '), { size: 9.5, color: INK.muted, gap: 2 });
  }

  w.heading(say(l, 'participation'));
  const p = r.participation;
  w.write(
    [
      say(l, 'joinedCount', { n: l.num(p.joined) }, p.joined),
      say(l, 'photoConsent', { n: l.num(p.withPhotoConsent) }, p.withPhotoConsent),
      say(l, 'notesCount', { n: l.num(p.notesTotal) }, p.notesTotal),
      say(l, 'askedForReport', { n: l.num(p.withAddress) }, p.withAddress),
    ].join(' · '),
    { gap: 4 },
  );
  if (p.perActivity.length) {
    w.table(
      [
        { label: say(l, 'activity'), width: w.contentWidth - 180 },
        { label: say(l, 'contributions'), width: 60 },
        { label: say(l, 'tookPart'), width: 60 },
        { label: say(l, 'share'), width: 60 },
      ],
      p.perActivity.map((a) => [
        a.title,
        // A vote counts its ballots, any other activity its notes.
        a.ballots !== null ? say(l, 'ballots', { n: l.num(a.ballots) }, a.ballots) : say(l, 'notes', { n: l.num(a.notes) }, a.notes),
        l.num(a.contributors),
        percentText(a.rate * 100),
      ]),
    );
  }

  w.heading(say(l, 'nextSteps'));
  if (r.nextSteps.length === 0) w.write(say(l, 'noNextSteps'), { color: INK.muted });
  for (const n of r.nextSteps) w.bullet(n.text, nameIn(l, n.author));

  w.rule();
  w.write(say(l, 'personalData'), { size: 8.5, color: INK.muted });
  // The workshop, whether names are removed, and the page number at the foot of every page.
  w.footers((page, pages) => say(l, r.anonymized ? 'footerAnonymized' : 'footer', { title: r.workshop.title, page: l.num(page), pages: l.num(pages) }));
  return w.finish();
}
