import { test, expect, type Locator, type Page } from '@playwright/test';
import { DEMO, expectAccessible, joinPhone, runLive, shot, signIn, sketchPng } from './fixtures';

// The full-day template's agenda, by position (see shared/templates.ts).
const AGENDA = { interview: 2, empathyMap: 3, howMightWe: 7, sketch: 11, testRounds: 15 };


/** Drags a note by its handle into a list, with small pointer steps (the lists sort by pointer, not HTML5 drag). */
async function dragInto(page: Page, note: Locator, target: Locator): Promise<void> {
  const handle = note.getByTestId('note-handle');
  // Both ends well inside the window, away from the edges where dragging scrolls the page.
  await target.evaluate((el) => el.scrollIntoView({ block: 'center' }));
  const a = (await handle.boundingBox())!;
  const b = (await target.boundingBox())!;
  await page.mouse.move(a.x + a.width / 2, a.y + a.height / 2);
  await page.mouse.down();
  await page.mouse.move(a.x + a.width / 2 + 4, a.y + a.height / 2 + 8, { steps: 2 });
  await page.mouse.move(b.x + b.width / 2, b.y + b.height / 2, { steps: 6 });
  await page.mouse.move(b.x + b.width / 2, b.y + b.height / 2 + 4, { steps: 2 });
  await page.mouse.up();
}

/** Drags the note with this text from the ungrouped notes into a theme, again if a board refresh moved it away mid-drag. */
async function dropIntoTheme(page: Page, text: string, theme: Locator): Promise<void> {
  const inTheme = theme.getByTestId('moderation-note').filter({ hasText: text });
  await expect(async () => {
    if ((await inTheme.count()) === 0) {
      await dragInto(page, page.getByTestId('ungrouped').getByTestId('moderation-note').filter({ hasText: text }), theme.locator('ul'));
    }
    await expect(inTheme).toHaveCount(1, { timeout: 3000 });
  }).toPass({ timeout: 20_000 });
}

test('activities on the phones, the console and the projector: pairs, a team map, questions grouped and promoted, a sketch and a test round', async ({ browser }) => {
  test.setTimeout(90_000);

  // A fresh full-day workshop, so other browser tests' rooms do not mix in.
  const consoleContext = await browser.newContext({ viewport: { width: 1400, height: 1000 } });
  const consolePage = await consoleContext.newPage();
  const title = `First ride activities ${Date.now()}`;
  const signedIn = await consolePage.request.post('/api/auth/sign-in', { data: DEMO.facilitator });
  const { accessToken } = (await signedIn.json()) as { accessToken: string };
  const made = await consolePage.request.post('/api/workshops', {
    headers: { Authorization: `Bearer ${accessToken}` },
    data: { title, objective: "Improve a new member's first ride", date: '2027-06-05', headcount: 3, templateId: 'full-day' },
  });
  expect(made.status()).toBe(201);

  await signIn(consolePage, DEMO.facilitator);
  await consolePage.getByRole('link', { name: title }).click();
  await runLive(consolePage);
  await expect(consolePage.getByTestId('console-activity')).toBeVisible();
  const code = (await consolePage.getByTestId('console-code').textContent())!.trim();
  const projectorUrl = await consolePage.getByTestId('open-projector').getAttribute('href');
  const projector = await consoleContext.newPage();
  await projector.setViewportSize({ width: 1600, height: 900 });
  await projector.goto(projectorUrl!);
  await expect(projector.getByTestId('projector-code')).toHaveText(code);
  // The console is the tab the facilitator works in; a tab in the background gets few animation frames.
  await consolePage.bringToFront();

  const joinUrl = new URL(`/join/${code}`, consolePage.url()).toString();
  const ana = await joinPhone(browser, joinUrl, 'Ana', true);
  const ben = await joinPhone(browser, joinUrl, 'Ben', true);
  const cleo = await joinPhone(browser, joinUrl, 'Cleo', false);
  const phones = { Ana: ana, Ben: ben, Cleo: cleo };
  await expect(consolePage.getByTestId('online-count')).toHaveText('3');

  // Two teams, from the console.
  await consolePage.getByTestId('teams-panel').getByText('Teams: not formed yet').click();
  await consolePage.getByLabel('Number of teams').fill('2');
  await consolePage.getByTestId('form-teams').click();
  await expect(consolePage.getByTestId('team')).toHaveCount(2);

  // Interview: three people, so one pair and one resting; every phone shows its partner.
  await consolePage.getByTestId('timeline-item').nth(AGENDA.interview).click();
  await expect(consolePage.getByTestId('pair')).toHaveCount(1);
  const resting = (await consolePage.getByTestId('rounds-panel').getByTestId('resting').textContent())!.replace('Sits this round out:', '').trim();
  const pairText = (await consolePage.getByTestId('pair').textContent())!;
  const [first, second] = pairText.split('↔').map((s) => s.trim()) as [keyof typeof phones, keyof typeof phones];
  await expect(phones[first].getByTestId('partner-name')).toHaveText(second);
  await expect(phones[second].getByTestId('partner-name')).toHaveText(first);
  await expect(phones[resting as keyof typeof phones].getByTestId('resting')).toBeVisible();
  await phones[first].getByTestId('choose-part-says').click();
  await phones[first].getByTestId('note-input').fill('I never know which dock has a free space');
  await phones[first].getByTestId('send-note').click();
  await expect(consolePage.getByTestId('interview-notes')).toContainText('I never know which dock has a free space');
  await expect(consolePage.getByTestId('interview-notes')).toContainText(`about ${second}`);
  await shot(phones[first], 'activities-phone-interview');
  // The console moves to the next round; the phones follow.
  await consolePage.getByTestId('round-next').click();
  await expect(consolePage.getByTestId('round-label')).toContainText('Round 2 of 2');
  await expect(phones[resting as keyof typeof phones].getByTestId('partner-name')).toBeVisible();

  // Empathy map: a teammate's note appears on the other teammate's phone as it comes.
  await consolePage.getByTestId('timeline-item').nth(AGENDA.empathyMap).click();
  await expect(ana.getByTestId('my-team')).toBeVisible();
  const teamOf = async (p: Page) => (await p.getByTestId('my-team').textContent())!.replace('Your team:', '').trim();
  const teams = { Ana: await teamOf(ana), Ben: await teamOf(ben), Cleo: await teamOf(cleo) };
  const names = Object.keys(teams) as (keyof typeof teams)[];
  const [writer, reader] = names.filter((n) => names.some((m) => m !== n && teams[m] === teams[n]));
  expect(writer && reader).toBeTruthy();
  await phones[writer!].getByTestId('choose-part-sees').click();
  await phones[writer!].getByTestId('note-input').fill('Rows of identical bikes and no signs');
  await phones[writer!].getByTestId('send-note').click();
  await expect(phones[reader!].getByTestId('team-map').getByTestId('part-sees')).toContainText('Rows of identical bikes and no signs');
  await expect(consolePage.getByTestId('team-maps')).toContainText('Rows of identical bikes and no signs');
  await shot(phones[reader!], 'activities-phone-team-map');

  // How might we: a gentle hint for an empty field, then three questions (one with HTML in it).
  await consolePage.getByTestId('timeline-item').nth(AGENDA.howMightWe).click();
  await ana.getByTestId('send-guided').click();
  await expect(ana.getByTestId('hint-action')).toContainText('What could we do?');
  const ask = async (p: Page, action: string, user: string, outcome: string) => {
    await p.getByTestId('guided-action').fill(action);
    await p.getByTestId('guided-user').fill(user);
    await p.getByTestId('guided-outcome').fill(outcome);
    await p.getByTestId('send-guided').click();
    await expect(p.getByTestId('guided-action')).toHaveValue('');
  };
  await ask(ana, 'show which docks are free', 'a new member', 'their first ride ends at a free dock');
  await ask(ben, 'make free docks easy to find', 'a new member', 'they can park without circling');
  await ask(cleo, '<b>fix</b> the saddle height', 'short riders', 'the bike fits at once');
  const notes = consolePage.getByTestId('moderation-note');
  await expect(notes).toHaveCount(3);
  // HTML in a note is shown as the text it is.
  await expect(notes.getByTestId('note-text').filter({ hasText: '<b>fix</b> the saddle height' })).toHaveCount(1);
  await expect(consolePage.locator('[data-test="moderation"] b')).toHaveCount(0);

  // Group the two dock questions into a theme: a new theme, then drag them in.
  await consolePage.getByTestId('new-theme').click();
  await consolePage.getByRole('dialog').locator('input').fill('Docks');
  await consolePage.getByRole('dialog').getByRole('button', { name: 'Save' }).click();
  const theme = consolePage.getByTestId('theme');
  await expect(theme.getByTestId('theme-name')).toContainText('Docks');
  await dropIntoTheme(consolePage, 'show which docks are free', theme);
  await dropIntoTheme(consolePage, 'make free docks easy to find', theme);
  await expect(theme.getByTestId('moderation-note')).toHaveCount(2);
  await expect(consolePage.getByTestId('ungrouped').getByTestId('moderation-note')).toHaveCount(1);
  // Rename it and promote it to an option of a later vote.
  await theme.getByTestId('theme-actions').click();
  await consolePage.getByTestId('rename-theme').click();
  await consolePage.getByTestId('rename-input').fill('Finding a free dock');
  await consolePage.getByTestId('rename-save').click();
  await expect(theme.getByTestId('theme-name')).toContainText('Finding a free dock');
  await theme.getByTestId('theme-actions').click();
  await consolePage.getByTestId('promote-theme').click();
  await expect(theme.getByTestId('theme-promoted')).toBeVisible();
  await expect(consolePage.getByTestId('promotion')).toContainText('Finding a free dock');

  // Show the room the themes; hide the saddle question from it, then undo the hide.
  await consolePage.getByTestId('reveal').click();
  await expect(projector.getByTestId('projector-theme').first()).toContainText('Finding a free dock');
  await expect(projector.getByTestId('projector-note')).toHaveCount(3);
  const saddle = notes.filter({ hasText: 'saddle' });
  await saddle.getByTestId('note-actions').click();
  await consolePage.getByTestId('hide-note').click();
  await expect(consolePage.getByTestId('hidden-notes')).toBeVisible();
  await expect(projector.getByTestId('projector-note')).toHaveCount(2);
  await expect(projector.getByTestId('activity-projector')).not.toContainText('saddle');
  await consolePage.getByRole('button', { name: 'Undo' }).click();
  await expect(projector.getByTestId('projector-note')).toHaveCount(3);
  await expect(projector.getByTestId('projector-note').filter({ hasText: '<b>fix</b> the saddle height' })).toHaveCount(1);
  await expect(projector.locator('[data-test="activity-projector"] b')).toHaveCount(0);
  await expect(consolePage.getByTestId('hidden-notes')).toHaveCount(0);
  await shot(consolePage, 'activities-console-themes');
  await shot(projector, 'activities-projector-themes');
  await expectAccessible(consolePage);
  await expectAccessible(projector);
  await expectAccessible(ana);

  // Sketch: Ana photographs her sheet; the console's gallery and Ben's phone show it; Ben gives feedback.
  await consolePage.getByTestId('timeline-item').nth(AGENDA.sketch).click();
  // She sends it with no network: it waits, and goes by itself once the phone is back online.
  await ana.getByTestId('photo-input').setInputFiles({ name: 'sketches.png', mimeType: 'image/png', buffer: sketchPng() });
  await ana.getByTestId('photo-caption').fill('Eight ways to show free docks');
  await ana.context().setOffline(true);
  await ana.getByTestId('send-photo').click();
  await expect(ana.getByTestId('photo-waiting')).toBeVisible();
  await ana.context().setOffline(false);
  await expect(ana.getByTestId('photo-sent')).toHaveText('1 photo added', { timeout: 20_000 });
  await expect(ana.getByTestId('photo-waiting')).toHaveCount(0);
  const galleryImage = consolePage.getByTestId('gallery-item').locator('img');
  await expect(galleryImage).toBeVisible();
  await expect.poll(() => galleryImage.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth > 0)).toBe(true);
  await expect(ben.getByTestId('sketch')).toContainText('Eight ways to show free docks');
  await ben.getByTestId('give-feedback').click();
  await ben.getByTestId('note-input').fill('Green for free docks reads at a glance');
  await ben.getByTestId('send-note').click();
  await expect(ana.getByTestId('sketch')).toContainText('Green for free docks reads at a glance');
  await expect(consolePage.getByTestId('gallery-item')).toContainText('1 piece of feedback');
  await shot(consolePage, 'activities-console-gallery');
  await shot(ana, 'activities-phone-sketch');

  // Test round: every phone is sent to another team's prototype; Ana fills the grid.
  await consolePage.getByTestId('timeline-item').nth(AGENDA.testRounds).click();
  for (const [name, p] of Object.entries(phones)) {
    const visiting = (await p.getByTestId('visit-team').textContent())!.trim();
    expect(visiting, `${name} visits another team`).not.toBe(teams[name as keyof typeof teams]);
  }
  for (const [part, text] of [
    ['worked', 'The dock map was clear'],
    ['didnt_work', 'Unlocking took three tries'],
    ['questions', 'What if the app is offline?'],
    ['ideas', 'A light on the free docks'],
  ] as const) {
    await ana.getByTestId(`choose-part-${part}`).click();
    await ana.getByTestId('note-input').fill(text);
    await ana.getByTestId('send-note').click();
  }
  await expect(ana.getByTestId('grid-encourage')).toHaveCount(0);
  const grid = consolePage.getByTestId('feedback-grid').filter({ hasText: 'The dock map was clear' });
  await expect(grid.getByTestId('part-questions')).toContainText('What if the app is offline?');
  await expect(grid.getByTestId('part-ideas')).toContainText('A light on the free docks');
  await shot(consolePage, 'activities-console-test-round');
  await shot(ana, 'activities-phone-test-round');
  await expectAccessible(ana);
});
