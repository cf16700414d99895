import fs from 'node:fs';
import path from 'node:path';
import { test, expect, type Page } from '@playwright/test';
import { parse } from 'csv-parse/sync';
import * as pdfjs from 'pdfjs-dist/legacy/build/pdf.mjs';
import { DEMO, expectAccessible, joinPhone, runLive, shot, signIn } from './fixtures';

/** Clicks a button that downloads a file and returns the file's bytes (kept under the test output too). */
async function download(page: Page, testId: string, keepAs?: string): Promise<Buffer> {
  const [file] = await Promise.all([page.waitForEvent('download'), page.getByTestId(testId).click()]);
  const bytes = fs.readFileSync((await file.path())!);
  if (keepAs) {
    fs.mkdirSync('.test-output', { recursive: true });
    fs.writeFileSync(path.join('.test-output', keepAs), bytes);
  }
  return bytes;
}

/** Parses a CSV export after checking RFC 4180's record ends: CRLF after every record, a bare LF only inside quotes. */
function csv(bytes: Buffer): string[][] {
  const text = bytes.toString('utf8');
  expect(text.endsWith('\r\n')).toBe(true);
  const outside = text.replace(/"(?:[^"]|"")*"/g, '');
  expect(outside.replace(/\r\n/g, '')).not.toMatch(/[\r\n]/);
  return parse(text, { bom: true, record_delimiter: '\r\n' }) as string[][];
}

const TITLE = "A new member's first ride";
const NOTES = ['Unlocking took three tries, then the app froze', 'She said "the dock beeped", twice\nand then nothing'];
const OPTIONS = ['How might we make unlocking a bike obvious?', 'How might we help a new member find a free dock?', 'How might we suggest a calm first route?'];

test('after a short live run: the results page, the notes and tallies CSV as the console showed them, and the report as PDF', async ({ browser }) => {
  test.setTimeout(120_000);
  const consoleContext = await browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true });
  const consolePage = await consoleContext.newPage();
  await signIn(consolePage, DEMO.facilitator);
  await consolePage.getByRole('link', { name: TITLE }).click();
  await runLive(consolePage);
  await expect(consolePage.getByTestId('console-activity')).toBeVisible();
  const code = (await consolePage.getByTestId('console-code').textContent())!.trim();
  const ana = await joinPhone(browser, `${new URL(consolePage.url()).origin}/join/${code}`, 'Ana Lima');

  // Insights: the phone adds two notes (a comma, quotes and a line break among them); the console shows them.
  await consolePage.getByTestId('timeline-item').filter({ hasText: 'What we learned' }).getByRole('button').click();
  await expect(ana.getByTestId('phone-activity')).toHaveText('What we learned');
  for (const text of NOTES) {
    // Quasar puts the attribute on the field's wrapper or on the textarea itself, depending on the field.
    await ana.locator('textarea[data-test="note-input"], [data-test="note-input"] textarea').fill(text);
    await ana.getByTestId('send-note').click();
  }
  await expect(consolePage.getByTestId('note-text')).toHaveCount(2);
  const consoleNotes = await consolePage.getByTestId('note-text').allTextContents();
  expect([...consoleNotes].sort()).toEqual([...NOTES].sort());

  // A dot vote: three options, one dot (the budget Cairn suggests for three), the phone votes, the facilitator closes it.
  await consolePage.getByTestId('timeline-item').filter({ hasText: 'Pick the challenges' }).getByRole('button').click();
  const setup = consolePage.getByTestId('vote-setup');
  for (const text of OPTIONS) {
    await setup.getByLabel('New option').fill(text);
    await setup.getByTestId('add-option').click();
  }
  await setup.getByTestId('save-vote').click();
  await consolePage.getByTestId('open-vote').click();
  await expect(ana.getByTestId('dot-option')).toHaveCount(3);
  await ana.getByTestId('dot-option').filter({ hasText: OPTIONS[0] }).getByTestId('dot-add').click();
  await expect(consolePage.getByTestId('voted-count')).toHaveText('1');
  await consolePage.getByTestId('close-vote').click();
  await expect(consolePage.getByTestId('vote-status')).toHaveText('Voting closed');
  const consoleTally = await consolePage.getByTestId('tally-row').evaluateAll((rows) =>
    rows.map((r) => ({ text: r.textContent ?? '', dots: r.querySelector('[data-test="tally-dots"]')?.textContent?.trim() ?? '' })),
  );
  expect(consoleTally).toHaveLength(3);

  // The phone asks for the report by e-mail from its own data page.
  const sessionId = new URL(ana.url()).pathname.split('/')[2]!;
  await ana.goto(`/phone/${sessionId}/my-data`);
  await ana.locator('input[data-test="my-email"], [data-test="my-email"] input').fill('ana.lima@harbourlane.example');
  await ana.getByTestId('my-email-save').click();
  await expect(ana.getByTestId('my-email-saved')).toBeVisible();
  await expect(ana.getByTestId('my-notes-count')).toHaveText('You wrote 2 notes in this workshop.');
  await shot(ana, 'results-phone-my-data');

  // End the day; the plan has a Results button.
  await consolePage.getByTestId('stop-session').click();
  await consolePage.getByRole('dialog').getByRole('button', { name: 'End the live session' }).click();
  await expect(consolePage.getByTestId('workshop-title')).toBeVisible();
  await consolePage.getByTestId('open-results').click();
  await expect(consolePage.getByTestId('results-title')).toHaveText(TITLE);
  const insights = consolePage.getByTestId('activity-insights');
  for (const text of NOTES) await expect(insights.getByTestId('result-note').filter({ hasText: text.split('\n')[0]! })).toHaveCount(1);
  // The agenda as run, one table per session of the day (other browser tests may have run the demo before): this run's is last.
  await expect(consolePage.getByTestId('session-agenda').last().getByTestId('agenda-run-row')).toHaveCount(17);
  await expect(consolePage.getByTestId('activity-dot_vote').getByTestId('vote-row').first()).toContainText(OPTIONS[0]!);
  // Other browser tests may have run the demo workshop live before this one: count at least this run's phone.
  await expect(consolePage.getByTestId('participation')).toContainText(/[1-9]\d* joined/);
  await expect(consolePage.getByTestId('participation')).toContainText('notes in all');
  await shot(consolePage, 'results-page');
  await expectAccessible(consolePage);

  // The notes CSV holds exactly the notes the console showed, field by field.
  const notes = csv(await download(consolePage, 'export-notes-csv', 'results-notes.csv'));
  expect(notes[0]).toEqual(['Session', 'Activity number', 'Activity', 'Activity type', 'Author', 'Team', 'Theme', 'Kind', 'Part', 'Note', 'Details', 'Written at']);
  // Only this run's notes: other browser tests may have run the demo workshop live before.
  const insightRows = notes.slice(1).filter((r) => r[3] === 'insights' && r[4] === 'Ana Lima');
  expect(insightRows.map((r) => r[9]).sort()).toEqual([...consoleNotes].sort());
  expect(new Set(insightRows.map((r) => r[4]))).toEqual(new Set(['Ana Lima']));
  // Every row names the session it comes from.
  expect(insightRows.every((r) => /^The day · /.test(r[0]!))).toBe(true);

  // The tallies CSV holds the console's tally: each option's dots.
  const tallies = csv(await download(consolePage, 'export-tallies-csv', 'results-tallies.csv'));
  // This run's vote block: the last session's rows.
  const voteRows = tallies.slice(1).filter((r) => r[2] === 'Pick the challenges');
  const lastSession = voteRows.at(-1)![0];
  const dots = voteRows.filter((r) => r[0] === lastSession);
  expect(dots).toHaveLength(3);
  for (const row of consoleTally) {
    const match = dots.find((r) => row.text.includes(r[5]!));
    expect(match, row.text).toBeDefined();
    expect(match![6]).toBe(row.dots);
  }

  // Names removed on request.
  await consolePage.getByTestId('export-anonymize').click();
  const anonymous = csv(await download(consolePage, 'export-notes-csv'));
  // Ana's notes carry one "Participant N" (N by order of joining, which earlier runs may have moved).
  const anonymousInsights = anonymous.slice(1).filter((r) => r[3] === 'insights' && NOTES.includes(r[9]!));
  expect(anonymousInsights).toHaveLength(2);
  expect(new Set(anonymousInsights.map((r) => r[4])).size).toBe(1);
  expect(anonymousInsights[0]![4]).toMatch(/^Participant \d+$/);
  expect(anonymous.slice(1).map((r) => r[4]).join('\n')).not.toContain('Ana Lima');

  // Send the report: a link to the observer, the PDF to Ana, who left her address.
  await consolePage.getByTestId('open-send').click();
  const dialog = consolePage.getByTestId('send-dialog');
  await dialog.getByTestId('send-member').filter({ hasText: 'Tomas Reed' }).click();
  await dialog.getByTestId('send-participant').filter({ hasText: 'Ana Lima' }).click();
  await expect(dialog.getByTestId('send-participant')).toContainText('a•••@harbourlane.example');
  await dialog.getByTestId('send-confirm').click();
  await expect(dialog).toHaveCount(0);

  // The report: a print-ready page, and its PDF made on the server.
  await consolePage.getByTestId('open-report').click();
  await expect(consolePage.getByTestId('report-title')).toHaveText(TITLE);
  await expect(consolePage.getByTestId('report')).toContainText('Agenda as run');
  await expect(consolePage.getByTestId('report')).toContainText(NOTES[0]!);
  await shot(consolePage, 'results-report');
  await consolePage.emulateMedia({ media: 'print' });
  await shot(consolePage, 'results-report-print');
  await consolePage.emulateMedia({ media: 'screen' });
  await expectAccessible(consolePage);
  const pdf = await download(consolePage, 'report-pdf', 'results-report.pdf');
  expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
  const doc = await pdfjs.getDocument({ data: new Uint8Array(pdf), isEvalSupported: false }).promise;
  let text = '';
  for (let i = 1; i <= doc.numPages; i++) {
    const content = await (await doc.getPage(i)).getTextContent();
    text += content.items.map((item) => ('str' in item ? item.str + (item.hasEOL ? ' ' : '') : '')).join('');
  }
  text = text.replace(/\s+/g, ' ');
  expect(text).toContain(TITLE);
  expect(text).toContain(NOTES[0]);
  expect(text).toContain('Agenda as run');

  // The observer reads the results but cannot send the report or delete anything.
  const observerContext = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const observer = await observerContext.newPage();
  await signIn(observer, DEMO.observer);
  await observer.goto(consolePage.url().replace(/\/report$/, '/results'));
  await expect(observer.getByTestId('results-title')).toBeVisible();
  await expect(observer.getByTestId('open-send')).toHaveCount(0);
  await expect(observer.getByTestId('retention-delete-now')).toHaveCount(0);
  await expect(observer.getByTestId('retention-panel')).toContainText('Only the lead facilitator');

  // The admin's dev inbox holds both messages; Ana's carries the PDF.
  const adminContext = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const admin = await adminContext.newPage();
  await signIn(admin, DEMO.admin);
  await admin.goto('/dev/inbox');
  const toAna = admin.getByTestId('dev-message').filter({ hasText: 'ana.lima@harbourlane.example' });
  await expect(toAna).toContainText('Report of the workshop');
  await expect(toAna).toContainText(/Attached: cairn-.*-report\.pdf/);
  await expect(admin.getByTestId('dev-message').filter({ hasText: 'tomas@harbourlane.example' })).toContainText('/report');
});
