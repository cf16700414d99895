import { dayText, percentText } from '../../../shared/words';
import fsp from 'node:fs/promises';
import path from 'node:path';
import PDFDocument from 'pdfkit';
import { FACES, HAS_FONTS, hasRtl, layoutBidi, scriptRuns, useFace, type Weight } from './report-fonts';
import { Op } from 'sequelize';
import type { AppContext } from '../../context';
import type { UserRow } from '../../db/models';
import { AppError, errors } from '../../common/errors';
import type { ResultsService } from './results.service';
import { exportFileName } from './export.service';
import type { SessionSelector } from '../../../shared/sessions';
import { typeAndPhase } from '../../../shared/activities';
import { contributionsText, voteScoreLabel } from '../../../shared/schemas/results';
import { partLabel } from '../../../shared/schemas/activities';
import type {
  ActivityResult,
  NoteGroup,
  NoteResult,
  ReportRecipients,
  ResultSection,
  SendReportAnswer,
  SendReportBody,
  WorkshopResults,
} from '../../../shared/schemas/results';

/** Cairn's report colours: the light palette's teal, text and muted grey (src/theme/palette.ts). */
const INK = { teal: '#0b5d5b', text: '#1e2a29', muted: '#4f5d5b', rule: '#d8cdb8' };

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

/** Space between lines of the report's text, in points. */
const LINE_GAP = 1.5;

/**
 * Writes Cairn's report into a pdfkit document: text stays text (no markup is read), every script in
 * Source Sans 3 where it has one and in a shipped fallback where it has not, right-to-left text in order.
 */
class ReportWriter {
  readonly doc: PDFKit.PDFDocument;
  private readonly left = 56;
  private readonly width: number;

  constructor(
    r: WorkshopResults,
    private photos: Map<string, Buffer>,
  ) {
    this.doc = new PDFDocument({
      size: 'A4',
      margins: { top: 56, bottom: 64, left: 56, right: 56 },
      bufferPages: true,
      info: {
        Title: `Workshop report: ${r.workshop.title}`,
        Author: r.workshop.ownerName || 'Cairn',
        Subject: r.workshop.objective.slice(0, 200),
        Creator: 'Cairn',
        CreationDate: new Date(r.generatedAt),
      },
    });
    this.width = this.doc.page.width - this.left - 56;
  }

  /** Writes text in the fonts its scripts need; `at` places it, otherwise it flows on. */
  write(
    text: string,
    o: { size?: number; weight?: Weight; color?: string; at?: { x: number; y: number }; width?: number; indent?: number; gap?: number } = {},
  ): void {
    const doc = this.doc;
    doc.fontSize(o.size ?? 10.5).fillColor(o.color ?? INK.text);
    // Helvetica has no glyphs outside Windows-1252: without the shipped fonts, other letters become '?'.
    const safe = HAS_FONTS ? text : text.replace(/[^\x20-\x7e\u00a0-\u00ff\n]/g, '?');
    const width = o.width ?? this.width - (o.indent ?? 0);
    const x = o.at ? o.at.x : this.left + (o.indent ?? 0);
    if (HAS_FONTS && hasRtl(safe)) {
      this.writeBidi(safe, x, o.at ? o.at.y : doc.y, width, o.weight ?? 'regular');
    } else {
      const runs = scriptRuns(safe.length ? safe : ' ');
      const options = { width, lineGap: LINE_GAP };
      runs.forEach((run, i) => {
        useFace(doc, run.face, o.weight ?? 'regular');
        const continued = i < runs.length - 1;
        if (i === 0) doc.text(run.text, x, o.at ? o.at.y : doc.y, { ...options, continued });
        else doc.text(run.text, { continued });
      });
    }
    if (o.gap) doc.y += o.gap;
  }

  /**
   * Writes text that holds right-to-left letters line by line in display order (report-fonts.ts): a
   * right-to-left paragraph is set flush right, its first word at the right edge.
   */
  private writeBidi(text: string, x: number, y: number, width: number, weight: Weight): void {
    const doc = this.doc;
    let top = y;
    for (const line of layoutBidi(doc, text, width, weight)) {
      let at = line.rtl ? x + width - line.width : x;
      for (const piece of line.pieces) {
        useFace(doc, piece.face, weight);
        // Features make pdfkit shape the piece as one run, so the engine puts a right-to-left run in order.
        const options = { lineBreak: false, features: [] } as PDFKit.Mixins.TextOptions;
        doc.text(piece.text, at, top, options);
        at += doc.widthOfString(piece.text, options);
      }
      useFace(doc, FACES[0] ?? null, weight);
      top += doc.currentLineHeight(true) + LINE_GAP;
    }
    doc.x = x;
    doc.y = top;
  }

  /** The height a text takes at a width (measured in the regular Latin face, close enough for layout). */
  heightOf(text: string, width: number, size = 10.5): number {
    useFace(this.doc, FACES[0] ?? null, 'regular');
    this.doc.fontSize(size);
    if (HAS_FONTS && hasRtl(text)) return layoutBidi(this.doc, text, width, 'regular').length * (this.doc.currentLineHeight(true) + LINE_GAP);
    return this.doc.heightOfString(text || ' ', { width, lineGap: LINE_GAP });
  }

  /** Starts a new page when less than `needed` points are left. */
  ensure(needed: number): void {
    if (this.doc.y + needed > this.doc.page.height - this.doc.page.margins.bottom) this.doc.addPage();
  }

  heading(text: string, level: 1 | 2 | 3 = 1): void {
    const size = level === 1 ? 16 : level === 2 ? 13 : 11;
    // Keep a heading with at least two lines of what follows it.
    this.ensure(size * 2 + 60);
    this.doc.y += level === 1 ? 10 : 6;
    this.write(text, { size, weight: 'bold', color: level === 3 ? INK.text : INK.teal, gap: 3 });
  }

  line(label: string, value: string): void {
    this.ensure(28);
    this.write(label, { size: 9, weight: 'bold', color: INK.muted });
    this.write(value, { gap: 4 });
  }

  bullet(text: string, by?: string): void {
    this.ensure(24);
    const y = this.doc.y;
    this.write('•', { at: { x: this.left + 4, y }, width: 10, color: INK.muted });
    this.doc.y = y;
    this.write(by ? `${text} — ${by}` : text, { indent: 16, gap: 2 });
  }

  /** Places a photo (only those the results may show are ever given) below the line before it. */
  picture(photoId: string | null): void {
    const data = photoId ? this.photos.get(photoId) : undefined;
    if (!data) return;
    this.ensure(126);
    try {
      this.doc.image(data, this.left + 16, this.doc.y + 2, { fit: [180, 116] });
      this.doc.y += 122;
    } catch {
      // A picture pdfkit cannot read is left out; its caption is already written.
    }
    this.doc.x = this.left;
  }

  rule(): void {
    const y = this.doc.y + 4;
    this.doc.moveTo(this.left, y).lineTo(this.left + this.width, y).lineWidth(0.5).strokeColor(INK.rule).stroke();
    this.doc.y = y + 6;
  }

  /** A table of plain text cells; rows grow with their longest cell and never split across pages. */
  table(columns: { label: string; width: number; align?: 'left' | 'right' }[], rows: string[][]): void {
    const row = (cells: string[], bold: boolean) => {
      const height = Math.max(...cells.map((c, i) => this.heightOf(c, columns[i]!.width - 6, 9.5))) + 4;
      this.ensure(height + 2);
      const y = this.doc.y;
      let x = this.left;
      cells.forEach((c, i) => {
        const col = columns[i]!;
        this.write(c, { at: { x, y: y + 2 }, width: col.width - 6, size: 9.5, weight: bold ? 'bold' : 'regular', color: bold ? INK.muted : INK.text });
        x += col.width;
      });
      this.doc.y = y + height;
      this.doc.moveTo(this.left, this.doc.y).lineTo(this.left + this.width, this.doc.y).lineWidth(0.4).strokeColor(INK.rule).stroke();
    };
    row(columns.map((c) => c.label), true);
    for (const r of rows) row(r, false);
    this.doc.y += 6;
    this.doc.x = this.left;
  }

  /** Page numbers and the data-protection line at the foot of every page. */
  footers(r: WorkshopResults): void {
    const range = this.doc.bufferedPageRange();
    for (let i = range.start; i < range.start + range.count; i++) {
      this.doc.switchToPage(i);
      const bottom = this.doc.page.margins.bottom;
      // Writing inside the bottom margin would add a page; lift the margin while the footer is written.
      this.doc.page.margins.bottom = 0;
      const y = this.doc.page.height - 40;
      this.write(`${r.workshop.title} · Cairn workshop report${r.anonymized ? ' · names removed' : ''} · page ${i + 1} of ${range.count}`, {
        at: { x: this.left, y },
        size: 8,
        color: INK.muted,
      });
      this.doc.page.margins.bottom = bottom;
    }
  }

  get contentWidth(): number {
    return this.width;
  }
}

/** Writes notes in groups, each group's label in bold. */
function writeGroups(w: ReportWriter, groups: NoteGroup[]): void {
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
function writeSection(w: ReportWriter, s: ResultSection): void {
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
function writeActivity(w: ReportWriter, a: ActivityResult): void {
  w.heading(`${a.position}. ${a.title}`, 2);
  w.write(typeAndPhase(a.type, a.phase), { size: 9, color: INK.muted });
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
  const w = new ReportWriter(r, photos);
  const doc = w.doc;
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });

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
  w.footers(r);
  doc.end();
  return done;
}

/** An e-mail address with most of its local part hidden, for lists on screen (`m•••@harbourlane.example`). */
export function maskEmail(email: string): string {
  const at = email.lastIndexOf('@');
  if (at < 1) return '•••';
  return `${email[0]}•••${email.slice(at)}`;
}

/**
 * The printed report and sending it: the PDF of a workshop's results, who it can be sent to, and
 * sending it through Cairn's mail (a link for members, who sign in; the PDF, names removed, for
 * participants who left an address).
 */
export class ReportService {
  constructor(
    private ctx: AppContext,
    private results: ResultsService,
  ) {}

  /** The report as a PDF; with `anonymize`, every participant is "Participant N". */
  async pdf(workshopId: string, anonymize: boolean, selector: SessionSelector = 'day'): Promise<{ pdf: Buffer; fileName: string }> {
    const r = await this.results.results(workshopId, anonymize, Date.now(), selector);
    return { pdf: await renderReportPdf(r, await this.shownPhotos(r)), fileName: exportFileName(r, 'report.pdf') };
  }

  /** The thumbnails of the photos the results show (consent honoured there), read from the upload folder. */
  private async shownPhotos(r: WorkshopResults): Promise<Map<string, Buffer>> {
    const ids = new Set<string>();
    for (const a of r.activities) {
      for (const s of a.sections) {
        if (s.kind === 'photos') for (const p of s.photos) if (p.shown) ids.add(p.id);
        if (s.kind === 'storyboards') for (const b of s.boards) for (const f of b.frames) if (f.photoId) ids.add(f.photoId);
      }
    }
    const out = new Map<string, Buffer>();
    if (ids.size === 0) return out;
    const rows = await this.ctx.db.models.Photo.findAll({ where: { id: [...ids] }, attributes: ['id', 'storageKey'] });
    const dir = this.ctx.config.uploadDir;
    const names = await fsp.readdir(dir).catch(() => [] as string[]);
    for (const row of rows) {
      // The thumbnail is enough for print; the full picture if no thumbnail is kept.
      const name = names.find((n) => n.startsWith(`${row.storageKey}.thumb`)) ?? names.find((n) => n === `${row.storageKey}.jpg`);
      if (name) out.set(row.id, await fsp.readFile(path.join(dir, name)));
    }
    return out;
  }

  /** The workshop's co-facilitators and observers, and the participants who left an e-mail address (masked). */
  async recipients(workshopId: string): Promise<ReportRecipients> {
    const { Membership, User, LiveSession, Participant } = this.ctx.db.models;
    const memberships = await Membership.findAll({ where: { workshopId }, order: [['createdAt', 'ASC']] });
    const users = await User.findAll({ where: { id: memberships.map((m) => m.userId), disabled: false } });
    const byId = new Map(users.map((u) => [u.id, u]));
    const sessions = await LiveSession.findAll({ where: { workshopId }, attributes: ['id'] });
    const people = await Participant.findAll({
      where: { sessionId: sessions.map((s) => s.id), email: { [Op.ne]: null } },
      order: [['joinedAt', 'ASC']],
    });
    return {
      members: memberships.flatMap((m) => {
        const u = byId.get(m.userId);
        return u ? [{ userId: u.id, name: u.name, email: u.email, role: m.role }] : [];
      }),
      participants: people.map((p) => ({ participantId: p.id, name: p.displayName, maskedEmail: maskEmail(p.email!) })),
    };
  }

  /**
   * Sends the report: each chosen member gets a link to the report page (they sign in to read it),
   * each chosen participant who left an address gets the PDF with names removed, one message each so
   * no one sees another's address.
   */
  async send(workshopId: string, body: SendReportBody, sender: UserRow, baseUrl: string): Promise<SendReportAnswer> {
    const w = await this.ctx.db.models.Workshop.findByPk(workshopId);
    if (!w) throw errors.notFound('That workshop');
    const recipients = await this.recipients(workshopId);
    const members = recipients.members.filter((m) => body.memberIds.includes(m.userId));
    if (members.length !== new Set(body.memberIds).size) throw errors.badRequest('Choose members of this workshop only');
    const participantIds = new Set(recipients.participants.map((p) => p.participantId));
    if (!body.participantIds.every((id) => participantIds.has(id))) {
      throw errors.badRequest('Choose participants who left an address for the report only');
    }
    const people = body.participantIds.length
      ? await this.ctx.db.models.Participant.findAll({ where: { id: [...new Set(body.participantIds)] } })
      : [];
    const note = body.note ? `${sender.name} adds:\n\n${body.note}\n\n` : '';
    const title = `“${w.title}” (${dayText(w.date, 'en-GB')})`;
    const link = `${baseUrl}/workshops/${encodeURIComponent(workshopId)}/report`;
    const send = async (mail: Parameters<AppContext['mail']['send']>[0]) => {
      try {
        await this.ctx.mail.send(mail);
      } catch (err) {
        this.ctx.logger.error({ err }, 'the report could not be sent');
        throw new AppError(502, 'internal', 'The mail server did not take the report; try again later');
      }
    };
    for (const m of members) {
      await send({
        to: m.email,
        subject: `Report of the Cairn workshop ${title}`,
        text:
          `Hello ${m.name},\n\n${sender.name} shares the report of the workshop ${title} with you.\n\n${note}` +
          `Read it in Cairn (sign in as ${m.email}); you can print it or save it as a PDF there:\n\n${link}\n\n` +
          "The report holds what participants said. Share it only as your organisation's data-protection policy allows.\n",
      });
    }
    if (people.length) {
      const { pdf, fileName } = await this.pdf(workshopId, true);
      for (const p of people) {
        if (!p.email) continue;
        await send({
          to: p.email,
          subject: `Report of the workshop ${title}`,
          text:
            `Hello,\n\nYou asked for the report of the workshop ${title}. It is attached as a PDF; ` +
            `the names of participants are removed from it.\n\n${note}` +
            'You get this message because you left your e-mail address on your phone at the workshop. ' +
            "The organisation's data-protection policy applies; the facilitator can delete e-mail addresses after the workshop.\n",
          attachments: [{ filename: fileName, content: pdf, contentType: 'application/pdf' }],
        });
      }
    }
    return { links: members.length, attachments: people.filter((p) => p.email).length };
  }
}
