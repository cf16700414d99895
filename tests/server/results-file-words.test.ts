import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { pdfText } from './pdf-text';
import { renderReportPdf } from '../../server/features/results/report-content';
import { teamsTable, toCsv } from '../../server/features/results/export.service';
import { facilitatorWording } from '../../server/common/catalogs';
import { LOCALES } from '../../shared/locales';
import type { WorkshopResults } from '../../shared/schemas/results';

// The PDF report's and the CSV exports' fixed words come from the facilitator catalogs' `reportFile` in the
// files' language. Invented workshop of the demo scenario (Harbour Lane Bike Co-op).
const results = {
  generatedAt: Date.UTC(2027, 2, 13, 17),
  anonymized: true,
  workshop: { title: 'Harbour Lane: first rides', ownerName: 'Mira Calder', objective: "Improve a new member's first ride", persona: null, date: '2027-03-13', window: { start: '09:00', end: '17:00' } },
  sessions: [],
  agenda: [{ itemId: 'i1', position: 1, title: 'Interviews', type: 'interview', plannedStart: '09:30', plannedEnd: '10:00', actualStart: null, actualEnd: null, plannedMin: 30, actualMin: null, overMin: null }],
  activities: [],
  teams: [{ id: 't1', name: 'Team 1', session: 'The day', challenge: 'Make unlocking obvious', members: [{ name: 'Participant 2' }] }],
  participation: { joined: 1, withPhotoConsent: 1, notesTotal: 1, withAddress: 0, perActivity: [{ title: 'Pick a route', notes: 0, ballots: 1, contributors: 1, rate: 1 }] },
  nextSteps: [],
  participants: [{ session: 'The day', number: 1, name: 'Participant 1', teamName: 'Team 1', photoConsent: true, leftAddress: false, joinedAt: 0, notes: 1 }],
} as unknown as WorkshopResults;

describe('the report and the exports speak from the catalogs', () => {
  it('writes the report in English by default and in German when asked, made names included', async () => {
    const en = await pdfText(await renderReportPdf(results));
    for (const words of ['Cairn · Workshop report', 'Agenda as run', 'did not run', 'Challenge: Make unlocking obvious', '1 participant joined', '1 note in all', '1 ballot', 'Participant 2', 'names removed · page 1 of 1']) {
      expect(en).toContain(words);
    }
    const de = await pdfText(await renderReportPdf(results, new Map(), 'de'));
    const w = facilitatorWording('de');
    for (const words of [
      w.t('reportFile.pdf.overline'),
      w.t('reportFile.pdf.agenda'),
      w.t('reportFile.pdf.notRun'),
      w.t('reportFile.pdf.challenge', { challenge: 'Make unlocking obvious' }),
      w.t('reportFile.pdf.notesCount', { n: 1 }, 1),
      w.t('reportFile.pdf.ballots', { n: 1 }, 1),
      '13. März 2027',
      'Cairn · Workshop-Bericht',
      'Teams und ihre Aufgaben',
      // "Participant 2" is a name Cairn gave: German says "Person 2" (the participant catalog's madeName).
      'Person 2',
      'Seite 1 von 1',
    ]) {
      expect(de).toContain(words);
    }
    for (const english of ['Agenda as run', 'Challenge:', 'Participant 2', 'did not run']) expect(de).not.toContain(english);
  });

  it('writes a CSV header and its yes/no cells in German when asked', () => {
    const w = facilitatorWording('de');
    expect(teamsTable(results, 'de').header).toEqual(['Sitzung', 'Team', 'Aufgabe', 'Größe', 'Mitglieder']);
    expect(teamsTable(results).header).toEqual(['Session', 'Team', 'Challenge', 'Size', 'Members']);
    const csv = toCsv({ header: teamsTable(results, 'de').header, rows: [[null, true, false, 2, 'x']] }, { bom: false, locale: 'de' });
    expect(csv).toBe(`Sitzung,Team,Aufgabe,Größe,Mitglieder\r\n,${w.t('reportFile.csv.yes')},${w.t('reportFile.csv.no')},2,x\r\n`);
    expect(csv).toContain(',ja,nein,');
  });

  it('uses only keys that every catalog has', () => {
    type Tree = { [key: string]: string | Tree };
    const source = ['report-content.ts', 'export.service.ts'].map((f) => readFileSync(new URL(`../../server/features/results/${f}`, import.meta.url), 'utf8'));
    const keys = new Set<string>(['madeName.participant', 'madeName.team']);
    for (const [file, prefix] of [[source[0]!, 'reportFile.pdf'], [source[1]!, 'reportFile.csv']] as const) {
      // Every key named where a word is said: say(l, 'key'), say(l, cond ? 'a' : 'b'), and each header's list.
      for (const m of file.matchAll(/say\(l, ([^,)]+)/g)) for (const q of m[1]!.matchAll(/'([\w.]+)'/g)) keys.add(`${prefix}.${q[1]}`);
      for (const m of file.matchAll(/headerOf\([^,]+, \[([^\]]+)\]/g)) for (const q of m[1]!.matchAll(/'([\w.]+)'/g)) keys.add(`${prefix}.${q[1]}`);
    }
    // Words the report shares with the results page, named whole: l.t('resultWords.criterionDots', …).
    for (const m of source[0]!.matchAll(/l\.t\('([\w.]+)'/g)) keys.add(m[1]!);
    for (const method of ['dots', 'borda', 'schulze', 'first_choices']) keys.add(`reportFile.pdf.method.${method}`).add(`resultSections.score.${method}`);
    expect(keys).toContain('resultWords.criterionDots');
    expect(keys.size).toBeGreaterThan(80);
    for (const locale of LOCALES) {
      const facilitator = JSON.parse(readFileSync(new URL(`../../src/i18n/facilitator/${locale}.json`, import.meta.url), 'utf8')) as Tree;
      const phone = JSON.parse(readFileSync(new URL(`../../src/i18n/locales/${locale}.json`, import.meta.url), 'utf8')) as Tree;
      const tree: Tree = { ...facilitator, madeName: phone.madeName! };
      for (const key of keys) {
        const found = key.split('.').reduce<string | Tree | undefined>((node, part) => (typeof node === 'object' ? node[part] : undefined), tree);
        expect({ locale, key, type: typeof found }).toEqual({ locale, key, type: 'string' });
      }
    }
  });
});
