import { participantMail } from './participant-mail';
import { isLocale } from '../../../shared/locales';
import { dayText } from '../../../shared/words';
import fsp from 'node:fs/promises';
import path from 'node:path';
import { Op } from 'sequelize';
import type { AppContext } from '../../context';
import type { UserRow } from '../../db/models';
import { AppError, because, errors } from '../../common/errors';
import type { ResultsService } from './results.service';
import { exportFileName } from './export.service';
import { renderReportPdf } from './report-content';
import type { SessionSelector } from '../../../shared/sessions';
import type { ReportRecipients, SendReportAnswer, SendReportBody, WorkshopResults } from '../../../shared/schemas/results';

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
    if (!w) throw errors.notFound('workshop');
    const recipients = await this.recipients(workshopId);
    const members = recipients.members.filter((m) => body.memberIds.includes(m.userId));
    if (members.length !== new Set(body.memberIds).size) throw errors.badRequest('Choose members of this workshop only', because('report_members_only'));
    const participantIds = new Set(recipients.participants.map((p) => p.participantId));
    if (!body.participantIds.every((id) => participantIds.has(id))) {
      throw errors.badRequest('Choose participants who left an address for the report only', because('report_participants_only'));
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
        throw new AppError(502, 'internal', 'The mail server did not take the report; try again later', undefined, because('mail_refused'));
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
        // In the language the participant's phone showed when they joined (or chose later).
        const mail = participantMail(
          isLocale(p.locale) ? p.locale : 'en',
          { title: w.title, date: w.date, retentionDays: w.retentionDays ?? null },
          body.note ? { from: sender.name, text: body.note } : null,
        );
        await send({
          to: p.email,
          ...mail,
          attachments: [{ filename: fileName, content: pdf, contentType: 'application/pdf' }],
        });
      }
    }
    return { links: members.length, attachments: people.filter((p) => p.email).length };
  }
}
