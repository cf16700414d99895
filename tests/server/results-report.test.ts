import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as pdfjs from 'pdfjs-dist/legacy/build/pdf.mjs';
import { pdfText } from './pdf-text';
import { addMember, bearer, createStranger, liveDay, startTestApp, type LiveDay, type TestAccount, type TestApp } from './helpers';
import { renderReportPdf } from '../../server/features/results/report-content';
import { ResultsService } from '../../server/features/results/results.service';
import { reportWord } from '../shared/english';

let t: TestApp;
let day: LiveDay;
let cofacilitator: TestAccount;

beforeAll(async () => {
  t = await startTestApp();
  day = await liveDay(t, {
    title: 'Harbour Lane: the report',
    phones: [
      { displayName: 'Ana Lima', photoConsent: true },
      { displayName: 'Ben Okafor', photoConsent: false },
      { displayName: 'Chidi Brandt' },
    ],
    teams: [
      { name: 'Team Dock', challenge: 'Make unlocking obvious', phones: [0, 1] },
      { name: 'Team Route', challenge: 'A calm first route', phones: [2] },
    ],
    notes: [
      { type: 'insights', phone: 0, text: 'Unlocking took three tries, then the app froze' },
      { type: 'insights', phone: 1, text: 'Замок не открылся с первого раза' },
      { type: 'insights', phone: 2, text: 'Ο σταθμός ήταν άδειος' },
      { type: 'insights', phone: 0, text: '<b>Not bold</b> & <i>not italic</i>' },
      { type: 'test_rounds', phone: 2, kind: 'feedback', part: 'ideas', text: 'Add a map on the dock', fields: (teams) => ({ hostTeamId: teams.get('Team Dock')! }) },
      { type: 'closing', phone: 1, kind: 'reflection', part: 'next_step', text: 'Prototype the welcome ride card next week' },
    ],
  });
  cofacilitator = await createStranger(t, 'cofacilitator');
  await addMember(t, day.workshopId, cofacilitator.id, 'cofacilitator');
});
afterAll(() => t?.close());

async function getPdf(token: string, query = ''): Promise<{ status: number; pdf: Buffer; headers: Record<string, string> }> {
  const res = await t.agent
    .get(`/api/workshops/${day.workshopId}/report.pdf${query}`)
    .set('Authorization', bearer(token))
    .buffer(true)
    .parse((r, done) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => done(null, Buffer.concat(chunks)));
    });
  return { status: res.status, pdf: res.body as Buffer, headers: res.headers as Record<string, string> };
}

describe('the printed report (PDF)', () => {
  it('holds the brief, the agenda as run, the results, the teams, participation and next steps, as text', async () => {
    const { status, pdf, headers } = await getPdf(await t.tokenFor('observer'));
    expect(status).toBe(200);
    expect(headers['content-type']).toBe('application/pdf');
    expect(headers['content-disposition']).toBe('attachment; filename=cairn-harbour-lane-the-report-2027-03-13-report.pdf');
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const text = await pdfText(pdf);
    for (const expected of [
      'Harbour Lane: the report',
      reportWord('brief'),
      "Improve a new member's first ride",
      reportWord('agenda'),
      reportWord('results'),
      'Unlocking took three tries, then the app froze — Ana Lima',
      // Cyrillic and Greek come out of the Source Sans 3 subsets shipped with the app.
      'Замок не открылся с первого раза',
      'Ο σταθμός ήταν άδειος',
      // Markup in a note is printed as the characters the participant typed.
      '<b>Not bold</b> & <i>not italic</i>',
      reportWord('feedbackGrid', { team: 'Team Dock' }),
      'Add a map on the dock',
      reportWord('teams'),
      reportWord('challenge', { challenge: 'Make unlocking obvious' }),
      reportWord('participation'),
      `${reportWord('joinedCount', { n: 3 }, 3)} · ${reportWord('photoConsent', { n: 2 }, 2)}`,
      reportWord('nextSteps'),
      'Prototype the welcome ride card next week',
      reportWord('personalData'),
    ]) {
      expect(text, expected).toContain(expected);
    }
    // Parts read in the room's words ("Next step"), never as ids such as "[next_step]".
    expect(text).toContain('Next step: Prototype the welcome ride card next week');
    expect(text).not.toMatch(/\[[a-z]+_[a-z_]+\]|next_step/);
  });

  it('prints every agenda item with its planned times, and the actual times of those that ran', async () => {
    const results = await new ResultsService(t.cairn.ctx).results(day.workshopId);
    const text = await pdfText(await renderReportPdf(results));
    for (const a of results.agenda) {
      expect(text).toContain(`${a.plannedStart}–${a.plannedEnd}`);
    }
    expect(text.split(reportWord('notRun')).length - 1).toBe(results.agenda.filter((a) => a.runCount === 0).length);
    const welcome = results.agenda[0]!;
    const clock = (ms: number) => `${String(new Date(ms).getHours()).padStart(2, '0')}:${String(new Date(ms).getMinutes()).padStart(2, '0')}`;
    expect(text).toContain(`${clock(welcome.actualStart!)}–${clock(welcome.actualEnd!)}`);
  });

  it('leaves every name out of the copy without names', async () => {
    const text = await pdfText((await getPdf(day.ownerToken, '?anonymize=true')).pdf);
    for (const name of ['Ana Lima', 'Ben Okafor', 'Chidi Brandt']) expect(text).not.toContain(name);
    expect(text).toContain('Participant 1');
    expect(text).toContain('names removed');
  });
});

describe('sending the report', () => {
  it('lists the members and, masked, the participants who left an address', async () => {
    const res = await t.agent
      .put('/api/participant/report-email')
      .set('Authorization', bearer(day.phones[0]!.answer.token))
      .send({ email: 'Ana.Lima@harbourlane.example' });
    expect(res.status).toBe(200);
    expect(res.body.email).toBe('ana.lima@harbourlane.example');
    const list = await t.agent.get(`/api/workshops/${day.workshopId}/report/recipients`).set('Authorization', bearer(day.ownerToken));
    expect(list.status).toBe(200);
    expect(list.body.members.map((m: { name: string; role: string }) => [m.name, m.role]).sort()).toEqual([
      ['Robin Stranger', 'cofacilitator'],
      ['Tomas Reed', 'observer'],
    ]);
    expect(list.body.participants).toEqual([{ participantId: day.phones[0]!.answer.me.id, name: 'Ana Lima', maskedEmail: 'a•••@harbourlane.example' }]);
  });

  it('mails a link to the chosen observer and the PDF, names removed, to the participant, through the dev SMTP server', async () => {
    const inbox = t.cairn.ctx.mail.dev!.messages;
    const before = inbox.length;
    const list = await t.agent.get(`/api/workshops/${day.workshopId}/report/recipients`).set('Authorization', bearer(cofacilitator.token));
    const observer = list.body.members.find((m: { role: string }) => m.role === 'observer');
    const res = await t.agent
      .post(`/api/workshops/${day.workshopId}/report/send`)
      .set('Authorization', bearer(cofacilitator.token))
      .send({ memberIds: [observer.userId], participantIds: [day.phones[0]!.answer.me.id], note: 'Thanks for a great day, <everyone>!' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toEqual({ links: 1, attachments: 1 });
    expect(inbox.length).toBe(before + 2);
    const [toObserver, toParticipant] = inbox.slice(before);

    expect(toObserver!.to).toEqual(['tomas@harbourlane.example']);
    expect(toObserver!.subject).toBe('Report of the Cairn workshop “Harbour Lane: the report” (13 March 2027)');
    // Cairn's writing rule: an e-mail's first sentence starts with a capital.
    expect(toParticipant!.text).toMatch(/^Hello,\n\nYou asked/);
    expect(toObserver!.text).toContain(`/workshops/${day.workshopId}/report`);
    expect(toObserver!.text).toContain('Thanks for a great day, <everyone>!');
    expect(toObserver!.attachments).toEqual([]);

    expect(toParticipant!.to).toEqual(['ana.lima@harbourlane.example']);
    expect(toParticipant!.text).toContain('without the names of participants');
    expect(toParticipant!.text).not.toContain('/workshops/');
    expect(toParticipant!.attachments).toHaveLength(1);
    const attachment = toParticipant!.attachments[0]!;
    expect(attachment.filename).toBe('cairn-harbour-lane-the-report-2027-03-13-report.pdf');
    expect(attachment.contentType).toBe('application/pdf');
    // The dev server keeps an attachment's size, not its bytes: it is the size of the report without names
    // (the same report rendered again differs only in its creation date, a field of fixed width).
    const again = await getPdf(day.ownerToken, '?anonymize=true');
    expect(attachment.size).toBe(again.pdf.length);
  });

  it('refuses people who are not members, or participants who left no address', async () => {
    for (const body of [{ memberIds: [day.phones[1]!.answer.me.id] }, { participantIds: [day.phones[1]!.answer.me.id] }, {}]) {
      const res = await t.agent.post(`/api/workshops/${day.workshopId}/report/send`).set('Authorization', bearer(day.ownerToken)).send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
    }
  });

  it('lets observers read the report but not send it', async () => {
    const observer = await t.tokenFor('observer');
    expect((await getPdf(observer)).status).toBe(200);
    const send = await t.agent.post(`/api/workshops/${day.workshopId}/report/send`).set('Authorization', bearer(observer)).send({ participantIds: [day.phones[0]!.answer.me.id] });
    expect(send.status).toBe(403);
    const list = await t.agent.get(`/api/workshops/${day.workshopId}/report/recipients`).set('Authorization', bearer(observer));
    expect(list.status).toBe(403);
  });
});

describe('notes in other scripts', () => {
  // Invented notes: Japanese ("the bike's lock was hard to find") and Arabic ("hello world", then a note
  // with a number). Source Sans 3 has neither script; the report takes them from its shipped fallbacks.
  const JAPANESE = '自転車の鍵が見つからない';
  const ARABIC_FIRST = 'مرحبا';
  const ARABIC_SECOND = 'بالعالم';
  // More invented notes in scripts Source Sans 3 lacks: Korean ("the bike lock is hard"), Devanagari (Hindi,
  // "the lock is stuck"), Thai ("the lock is hard to open") and Hebrew ("the lock is stuck", two words).
  const KOREAN = '자전거 자물쇠가 어려워요';
  const DEVANAGARI = 'ताला फँसा है';
  const THAI = 'ที่ล็อกเปิดยาก';
  const HEBREW_FIRST = 'המנעול';
  const HEBREW_SECOND = 'תקוע';

  /** PDF.js's text items of every page, with where each starts and its font. */
  async function items(pdf: Buffer): Promise<{ str: string; x: number; y: number; font: string }[]> {
    const doc = await pdfjs.getDocument({ data: new Uint8Array(pdf), useSystemFonts: false, isEvalSupported: false }).promise;
    const out: { str: string; x: number; y: number; font: string }[] = [];
    for (let i = 1; i <= doc.numPages; i++) {
      const page = await doc.getPage(i);
      const content = await page.getTextContent();
      for (const item of content.items) {
        if ('str' in item && item.str.trim()) out.push({ str: [...item.str].filter((c) => c.charCodeAt(0) >= 32).join(''), x: item.transform[4] as number, y: item.transform[5] as number + i * 10_000, font: content.styles[item.fontName]?.fontFamily ?? '' });
      }
    }
    await doc.destroy();
    return out;
  }

  it('prints Japanese, Arabic, Hebrew, Korean, Devanagari and Thai notes in their own letters, right-to-left text set from the right', async () => {
    const results = await new ResultsService(t.cairn.ctx).results(day.workshopId);
    const section = results.activities.flatMap((a) => a.sections).find((s) => s.kind === 'notes');
    expect(section, 'a notes section to add to').toBeDefined();
    const groups = section!.kind === 'notes' ? (section!.byTheme.length ? section!.byTheme : section!.byTeam) : [];
    const base = groups[0]!.notes[0]!;
    groups[0]!.notes.push(
      { ...base, id: 'jp', text: JAPANESE },
      { ...base, id: 'ar', text: `${ARABIC_FIRST} ${ARABIC_SECOND}` },
      { ...base, id: 'ko', text: KOREAN },
      { ...base, id: 'hi', text: DEVANAGARI },
      { ...base, id: 'th', text: THAI },
      { ...base, id: 'he', text: `${HEBREW_FIRST} ${HEBREW_SECOND}` },
    );
    const found = await items(await renderReportPdf(results));
    const all = found.map((i) => i.str).join('');
    // Every character is there, read back through the PDF's own character map. A character its face lacks
    // would be drawn as .notdef (glyph 0), and pdfkit maps that one glyph to the first such character only,
    // so a note of several different letters drawn in boxes cannot read back whole.
    for (const note of [JAPANESE, KOREAN, DEVANAGARI, THAI]) for (const ch of note.replace(/\s/g, '')) expect(all, note).toContain(ch);
    // Both words of each right-to-left note are there; on their line the first word stands right of the
    // second (Unicode Bidirectional Algorithm, UAX #9: a right-to-left paragraph reads from the right).
    const word = (w: string) => found.find((i) => i.str.includes(w) || i.str.includes([...w].reverse().join('')));
    for (const [a, b] of [[ARABIC_FIRST, ARABIC_SECOND], [HEBREW_FIRST, HEBREW_SECOND]] as const) {
      const first = word(a);
      const second = word(b);
      expect(first, JSON.stringify(found.filter((i) => /[\u0590-\u06ff]/.test(i.str)))).toBeDefined();
      expect(second).toBeDefined();
      expect(Math.abs(first!.y - second!.y)).toBeLessThan(1);
      expect(first!.x).toBeGreaterThan(second!.x);
    }
  });
});
