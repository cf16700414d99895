import { test, expect, type Browser, type Page } from '@playwright/test';
import fs from 'node:fs';
import path from 'node:path';
import { PNG } from 'pngjs';
import { DEMO, runLive, signIn } from './fixtures';

// The whole day of the invented Harbour Lane Bike Co-op, with a console (tablet), a projector and five
// phones (two small), through every activity in order: each activity hands the next what it made.

/** Where this spec keeps a screenshot of every screen at every step. */
const OUT = '.test-output/demo-day';

/** A small PNG made here: a sketch sheet of eight boxes. */
function sketchPng(shade: number): Buffer {
  const png = new PNG({ width: 160, height: 80 });
  for (let y = 0; y < 80; y++) {
    for (let x = 0; x < 160; x++) {
      const line = x % 40 < 2 || y % 40 < 2;
      const i = (y * 160 + x) * 4;
      png.data[i] = png.data[i + 1] = png.data[i + 2] = line ? 30 : shade;
      png.data[i + 3] = 255;
    }
  }
  return PNG.sync.write(png);
}

/** A phone of a given size that joins with a name and says yes to photos. */
async function joinPhone(browser: Browser, joinUrl: string, name: string, size: { width: number; height: number }): Promise<Page> {
  const context = await browser.newContext({ viewport: size, isMobile: true, hasTouch: true });
  const page = await context.newPage();
  await page.goto(joinUrl);
  await page.getByLabel('Your name for today').fill(name);
  await page.getByTestId('consent-yes').click();
  await page.getByTestId('join').click();
  await expect(page.getByTestId('connection')).toHaveText('Connected');
  return page;
}

test('the demo day with five phones: every activity hands the next what it made', async ({ browser }) => {
  // About 2 minutes on a quiet machine; the shared test machine is often several times slower.
  test.setTimeout(420_000);
  fs.rmSync(OUT, { recursive: true, force: true });
  fs.mkdirSync(OUT, { recursive: true });

  // A fresh full-day workshop of the co-op, so no other spec's room mixes in.
  const consoleContext = await browser.newContext({ viewport: { width: 1180, height: 820 } });
  const consolePage = await consoleContext.newPage();
  // Script errors of the console, kept for the report.
  const scriptErrors: string[] = [];
  consolePage.on('pageerror', (err) => scriptErrors.push(err.message));
  const title = `Harbour Lane demo day ${Date.now()}`;
  const signedIn = await consolePage.request.post('/api/auth/sign-in', { data: DEMO.facilitator });
  const { accessToken } = (await signedIn.json()) as { accessToken: string };
  const made = await consolePage.request.post('/api/workshops', {
    headers: { Authorization: `Bearer ${accessToken}` },
    data: { title, objective: "Improve a new member's first ride", date: '2027-06-05', headcount: 5, templateId: 'full-day' },
  });
  expect(made.status()).toBe(201);
  const workshopId = ((await made.json()) as { id: string }).id;

  await signIn(consolePage, DEMO.facilitator);
  await consolePage.getByRole('link', { name: title }).click();
  await runLive(consolePage);
  await expect(consolePage.getByTestId('console-activity')).toBeVisible();
  const code = (await consolePage.getByTestId('console-code').textContent())!.trim();
  const projector = await consoleContext.newPage();
  await projector.setViewportSize({ width: 1280, height: 720 });
  await projector.goto((await consolePage.getByTestId('open-projector').getAttribute('href'))!);
  await expect(projector.getByTestId('projector-code')).toHaveText(code);
  await consolePage.bringToFront();

  const joinUrl = new URL(`/join/${code}`, consolePage.url()).toString();
  const small = { width: 360, height: 640 };
  const names = ['Ana', 'Ben', 'Cleo', 'Dev', 'Eli'] as const;
  const sizes = [small, small, { width: 390, height: 844 }, { width: 412, height: 915 }, { width: 390, height: 844 }];
  const phones = await Promise.all(names.map((n, i) => joinPhone(browser, joinUrl, n, sizes[i]!)));
  phones.forEach((p, i) => p.on('pageerror', (err) => scriptErrors.push(`${names[i]}: ${err.message}`)));
  const [ana, ben, cleo, dev, eli] = phones as [Page, Page, Page, Page, Page];
  await expect(consolePage.getByTestId('online-count')).toHaveText('5');

  let step = 0;
  /** A screenshot of every screen, named by step: the console, the projector and each phone. */
  const snap = async (what: string) => {
    step += 1;
    const prefix = path.join(OUT, `${String(step).padStart(2, '0')}-${what}`);
    await Promise.all([
      consolePage.screenshot({ path: `${prefix}-console.png`, fullPage: true }),
      projector.screenshot({ path: `${prefix}-projector.png` }),
      ...phones.map((p, i) => p.screenshot({ path: `${prefix}-phone-${names[i]}.png`, fullPage: true })),
    ]);
  };
  /** The console moves to the next item of the agenda, and the projector follows. */
  const next = async (itemTitle: string) => {
    await consolePage.getByTestId('next').click();
    await expect(consolePage.getByTestId('console-activity')).toHaveText(itemTitle);
    await expect(projector.getByTestId('projector-activity')).toContainText(itemTitle);
  };
  const send = async (p: Page, text: string, part?: string) => {
    if (part) await p.getByTestId(`choose-part-${part}`).click();
    await p.getByTestId('note-input').fill(text);
    await p.getByTestId('send-note').click();
    await expect(p.getByTestId('note-input')).toHaveValue('');
  };
  await snap('welcome');

  // Warm-up pairs: every phone shows a partner or that it sits out.
  await next('Warm-up pairs');
  for (const p of phones) await expect(p.getByTestId('partner-name').or(p.getByTestId('resting'))).toBeVisible();
  await snap('warm-up');

  // Interviews: a note about the partner.
  await next('Interviews');
  for (const p of phones) await expect(p.getByTestId('partner-name').or(p.getByTestId('resting'))).toBeVisible();
  const interviewer = (await ana.getByTestId('partner-name').count()) ? ana : ben;
  await send(interviewer, 'I never know which dock has a free space', 'says');
  await expect(consolePage.getByTestId('interview-notes')).toContainText('I never know which dock has a free space');
  await snap('interviews');

  // Teams for the morning, from the console: two teams, the smaller one warned about with a merge offered.
  await consolePage.getByTestId('teams-panel').getByText('Teams: not formed yet').click();
  await consolePage.getByLabel('Number of teams').fill('2');
  await consolePage.getByTestId('form-teams').click();
  await expect(consolePage.getByTestId('team')).toHaveCount(2);
  await expect(consolePage.getByTestId('teams-panel').getByTestId('team-size-warning')).toContainText(/Team \d has 2 people/);

  // Empathy map: each team its own map.
  await next('Empathy map');
  await expect(ana.getByTestId('my-team')).toBeVisible();
  const teamOf = async (p: Page) => (await p.getByTestId('my-team').textContent())!.replace('Your team:', '').trim();
  const morning = { ana: await teamOf(ana), dev: await teamOf(dev) };
  await send(ana, 'Rows of identical bikes and no signs', 'sees');
  await send(dev, 'Worried the bike will not lock', 'thinks_feels');
  await expect(consolePage.getByTestId('team-maps')).toContainText('Rows of identical bikes and no signs');
  await snap('empathy-map');

  await next('Morning break');
  await snap('morning-break');

  // What we learned: a duplicate is merged and stays on its writer's phone; a phone visits its data page and comes back.
  await next('What we learned');
  await send(ana, 'Unlocking took three tries');
  await send(ben, 'Unlocking took three tries at the dock');
  await send(cleo, 'Nobody explained the dock lights');
  const moderation = consolePage.getByTestId('moderation-note');
  await expect(moderation).toHaveCount(3);
  await moderation.filter({ hasText: 'Unlocking took three tries' }).getByTestId('select-note').first().click();
  await moderation.filter({ hasText: 'three tries at the dock' }).getByTestId('select-note').click();
  await consolePage.getByTestId('merge-selected').click();
  await expect(ben.getByTestId('my-notes')).toContainText('Unlocking took three tries at the dock');
  await expect(ben.getByTestId('merged-flag')).toBeVisible();
  await expect(ben.getByTestId('sent-count')).toHaveText('1 sent in this activity');
  await expect(cleo.getByTestId('my-notes')).not.toContainText('three tries at the dock');
  // Ben looks at his notes and data, and comes back able to take part.
  await ben.getByRole('button', { name: 'Your settings' }).click();
  await ben.getByTestId('my-data-link').click();
  await expect(ben.getByTestId('my-data')).toBeVisible();
  await ben.getByRole('link', { name: 'Back to the workshop' }).or(ben.getByRole('button', { name: 'Back to the workshop' })).click();
  await expect(ben.getByTestId('note-input')).toBeVisible();
  await send(ben, 'The app asked for a card twice');
  await expect(moderation.filter({ hasText: 'The app asked for a card twice' })).toHaveCount(1);
  await snap('what-we-learned');

  await next('Point of view');
  await cleo.getByTestId('guided-user').fill('A new member');
  await cleo.getByTestId('guided-need').fill('to find a free dock near home');
  await cleo.getByTestId('guided-insight').fill('a full dock ends the first ride badly');
  await cleo.getByTestId('send-guided').click();
  await expect(cleo.getByTestId('guided-user')).toHaveValue('');
  await snap('point-of-view');

  // How might we: questions, two grouped into a theme and promoted, one promoted alone.
  await next('How might we questions');
  const ask = async (p: Page, action: string, outcome: string) => {
    await p.getByTestId('guided-action').fill(action);
    await p.getByTestId('guided-user').fill('a new member');
    await p.getByTestId('guided-outcome').fill(outcome);
    await p.getByTestId('send-guided').click();
    await expect(p.getByTestId('guided-action')).toHaveValue('');
  };
  await ask(ana, 'show which docks are free', 'their first ride ends at a free dock');
  await ask(ben, 'make free docks easy to find', 'they park without circling');
  await ask(dev, 'make unlocking a bike obvious', 'the first ride starts without help');
  await ask(eli, 'suggest a calm first route', 'they feel safe on the road');
  await expect(moderation).toHaveCount(4);
  await moderation.filter({ hasText: 'show which docks are free' }).getByTestId('select-note').click();
  await moderation.filter({ hasText: 'make free docks easy to find' }).getByTestId('select-note').click();
  await consolePage.getByTestId('group-selected').click();
  await consolePage.getByRole('dialog').locator('input').fill('Finding a free dock');
  await consolePage.getByRole('dialog').getByRole('button', { name: 'Save' }).click();
  const theme = consolePage.getByTestId('theme');
  await expect(theme.getByTestId('theme-name')).toContainText('Finding a free dock');
  await theme.getByTestId('theme-actions').click();
  await consolePage.getByTestId('promote-theme').click();
  await expect(theme.getByTestId('theme-promoted')).toBeVisible();
  await moderation.filter({ hasText: 'make unlocking a bike obvious' }).getByTestId('note-actions').click();
  await consolePage.getByTestId('promote-note').click();
  await expect(consolePage.getByTestId('promotion')).toHaveCount(2);
  await snap('how-might-we');

  await next('Lunch');
  await snap('lunch');

  // Pick the challenges: the promoted theme and note are offered first, taken in one tap; impact and effort.
  await next('Pick the challenges');
  const setup = consolePage.getByTestId('vote-setup');
  await expect(setup.getByTestId('promoted-option')).toHaveCount(2);
  await expect(setup.getByTestId('promoted-sources')).toContainText('Finding a free dock');
  await setup.getByTestId('take-promoted').click();
  await expect(setup.getByTestId('setup-option')).toHaveCount(2);
  for (const text of ['How might we suggest a calm first route for a new member?', 'How might we lend helmets at the dock?']) {
    await setup.getByLabel('New option').fill(text);
    await setup.getByTestId('add-option').click();
  }
  await expect(setup.getByTestId('setup-option')).toHaveCount(4);
  await setup.getByTestId('impact-effort').click();
  await expect(setup.getByTestId('criterion-hint').nth(1)).toHaveValue('a dot for each idea that would be easy to do');
  await snap('vote-setup');
  await setup.getByLabel('Carry forward (top N)').fill('2');
  // One tap saves (or says why in save-vote-problem): a second tap while it is on its way changes nothing.
  await setup.getByTestId('save-vote').click();
  await expect(consolePage.getByTestId('open-vote').or(consolePage.getByTestId('save-vote-problem'))).toBeVisible({ timeout: 30_000 });
  await expect(consolePage.getByTestId('save-vote-problem')).toHaveCount(0);
  await expect(consolePage.getByTestId('open-vote')).toBeVisible();
  await consolePage.getByTestId('open-vote').click();
  await expect(consolePage.getByTestId('vote-status')).toHaveText('Voting open');
  await expect(ana.getByTestId('criterion-meaning-effort')).toHaveText('Effort: a dot for each idea that would be easy to do');
  await expect(ana.getByTestId('criterion-meaning-impact')).toHaveText('Impact: a dot for each idea that would make the biggest difference');
  // Two dots each per criterion (four options). Impact on the dock theme and unlocking; effort ("easy") on the helmets and unlocking.
  const FREE = 'Finding a free dock';
  const UNLOCK = 'make unlocking a bike obvious';
  const HELMET = 'lend helmets';
  const dot = async (p: Page, criterion: string, option: string) => {
    const row = p.getByTestId(`criterion-${criterion}`).getByTestId('dot-option').filter({ hasText: option });
    const before = await p.getByTestId(`dots-left-${criterion}`).textContent();
    await row.getByTestId('dot-add').click();
    await expect(p.getByTestId(`dots-left-${criterion}`)).not.toHaveText(before ?? '');
  };
  for (const p of phones) {
    await dot(p, 'impact', FREE);
    await dot(p, 'impact', UNLOCK);
    await dot(p, 'effort', HELMET);
    await dot(p, 'effort', UNLOCK);
  }
  await expect(consolePage.getByTestId('voted-count')).toHaveText('5');
  await snap('vote-open');
  await consolePage.getByTestId('close-vote').click();
  await expect(consolePage.getByTestId('vote-status')).toHaveText('Voting closed');
  await consolePage.getByTestId('reveal').click();
  // By the matrix: unlocking (impact 5, easy 5) first, the free dock (impact 5, no "easy" dots) second; the
  // helmets (impact 0, easy 5) do not climb above them as a sum of dots would have it.
  await expect(consolePage.getByTestId('tally-row').first()).toContainText(UNLOCK);
  await expect(consolePage.getByTestId('tally-row').nth(1)).toContainText(FREE);
  await expect(consolePage.getByTestId('tally-row').first().getByTestId('tally-quadrant')).toHaveText('Impact high · Effort low');
  await expect(projector.getByTestId('dot-row').first()).toContainText(UNLOCK);
  await expect(projector.getByTestId('dot-row').nth(1)).toContainText(FREE);
  await consolePage.getByTestId('carry-forward').click();
  await expect(consolePage.getByTestId('carried')).toBeVisible();
  await expect(projector.getByTestId('projector-chosen')).toContainText(FREE);
  await snap('vote-results');

  // Form the teams: the two challenges carried forward become teams.
  await next('Form the teams');
  await consolePage.getByTestId('use-winners').click();
  await expect(consolePage.getByTestId('setup-option')).toHaveCount(2);
  await consolePage.getByTestId('save-vote').click();
  await consolePage.getByTestId('open-vote').click();
  for (const p of phones) {
    await expect(p.getByTestId('rank-item')).toHaveCount(2);
    await p.getByTestId('send-ranking').click();
    await expect(p.getByTestId('ranking-sent')).toBeVisible();
  }
  await consolePage.getByTestId('close-vote').click();
  await consolePage.getByTestId('propose-teams').click();
  await expect(consolePage.getByTestId('proposed-team')).toHaveCount(2);
  await snap('team-sort-proposed');
  await consolePage.getByTestId('confirm-teams').click();
  await expect(consolePage.getByTestId('confirmed-teams')).toBeVisible();
  for (const p of phones) await expect(p.getByTestId('my-team-challenge')).toBeVisible();
  await snap('team-sort-confirmed');

  // Sketch: Ana's photo shows people (all agreed); the room sees it; she withdraws consent and the projector blurs it within a second.
  await next('Quick sketches');
  await ana.getByTestId('photo-input').setInputFiles({ name: 'sketches.png', mimeType: 'image/png', buffer: sketchPng(250) });
  await ana.getByTestId('photo-caption').fill('Eight ways to show free docks');
  await ana.getByTestId('shows-people').click();
  await ana.getByTestId('people-consent').click();
  await ana.getByTestId('send-photo').click();
  await expect(ana.getByTestId('photo-sent')).toHaveText('1 photo added');
  await eli.getByTestId('photo-input').setInputFiles({ name: 'eli.png', mimeType: 'image/png', buffer: sketchPng(200) });
  await eli.getByTestId('photo-caption').fill('A light on every free dock');
  await eli.getByTestId('send-photo').click();
  await expect(eli.getByTestId('photo-sent')).toHaveText('1 photo added');
  await consolePage.getByTestId('reveal').click();
  const anaOnProjector = projector.getByTestId('projector-gallery').getByTestId('photo-thumb').filter({ hasText: 'Eight ways to show free docks' });
  await expect(anaOnProjector).toHaveAttribute('data-blurred', 'no');
  await expect(ben.getByTestId('sketch').filter({ hasText: 'Eight ways' }).getByTestId('photo-thumb')).toHaveAttribute('data-blurred', 'no');
  await snap('sketch-shown');
  await ana.getByRole('button', { name: 'Your settings' }).click();
  // The projector is the room's screen, in front: a background tab's timers are slowed to once a second.
  await projector.bringToFront();
  /** Waits until the photo with this caption is blurred on a screen, checking every 50 ms. */
  const blurredOn = (p: Page) =>
    p.waitForFunction(
      (caption) => [...document.querySelectorAll('[data-test="photo-thumb"]')].some((f) => f.textContent?.includes(caption) && f.getAttribute('data-blurred') === 'yes'),
      'Eight ways to show free docks',
      { polling: 50, timeout: 8_000 },
    );
  const withdrawnAt = Date.now();
  await ana.getByTestId('consent-toggle').click();
  const [projectorMs, phoneMs] = await Promise.all([blurredOn(projector).then(() => Date.now() - withdrawnAt), blurredOn(ben).then(() => Date.now() - withdrawnAt)]);
  // The figure is printed, not asserted (timed targets belong in benchmarks): on a quiet machine it is well under a
  // second; the 8 s wait above only fails if the change is not pushed at all (a board read again by chance came 10–15 s late).
  console.log(`consent withdrawn: projector blurred after ${projectorMs} ms, Ben's phone after ${phoneMs} ms (from the tap)`);
  await expect(anaOnProjector).toHaveAttribute('data-blurred', 'yes');
  await ana.keyboard.press('Escape');
  await consolePage.bringToFront();
  await snap('sketch-consent-withdrawn');

  // Eli removes everything he wrote: his photo goes with his notes.
  await eli.getByRole('button', { name: 'Your settings' }).click();
  await eli.getByTestId('my-data-link').click();
  await eli.getByTestId('my-notes-remove').click();
  await eli.getByTestId('my-notes-confirm').click();
  await expect(eli.getByTestId('my-notes-count')).toContainText('You wrote 0 notes');
  await eli.getByRole('link', { name: 'Back to the workshop' }).or(eli.getByRole('button', { name: 'Back to the workshop' })).click();
  await expect(projector.getByTestId('projector-gallery')).not.toContainText('A light on every free dock');
  await snap('sketch-contributions-removed');

  await next('Afternoon break');
  await snap('afternoon-break');

  // Storyboard: frames in words from two teammates.
  await next('Storyboard the idea');
  await send(cleo, 'She opens the app at the dock');
  await send(dev, 'A green light shows her a free dock');
  await expect(cleo.getByTestId('frame').filter({ hasText: 'She opens the app at the dock' })).toBeVisible();
  await expect(dev.getByTestId('frame').filter({ hasText: 'A green light shows her a free dock' })).toBeVisible();
  await snap('storyboard');

  await consolePage.getByTestId('next').click();
  await expect(consolePage.getByTestId('console-activity')).toHaveText('Afternoon break');
  await snap('afternoon-break-2');

  // Test rounds: round 1 feedback, then round 2 starts a fresh grid on the phone.
  await next('Test rounds');
  await expect(ana.getByTestId('visit-team')).toBeVisible();
  await send(ana, 'The dock map was clear', 'worked');
  await expect(ana.getByTestId('my-feedback')).toContainText('The dock map was clear');
  await snap('test-round-1');
  await consolePage.getByTestId('round-next').click();
  await expect(consolePage.getByTestId('round-label')).toContainText('Round 2');
  await expect(ana.getByTestId('my-feedback')).not.toContainText('The dock map was clear');
  await expect(ana.getByTestId('grid-encourage')).toBeVisible();
  await snap('test-round-2');

  await next('Closing and next steps');
  await send(ben, 'Try the welcome card next week', 'next_step');
  await snap('closing');

  // End the day, then read the results as the facilitator.
  await consolePage.getByTestId('stop-session').click();
  await consolePage.getByRole('dialog').getByRole('button', { name: 'End the live session' }).click();
  await expect(ana.getByTestId('session-ended')).toBeVisible();
  await consolePage.goto(`/workshops/${workshopId}/results`);
  await expect(consolePage.getByTestId('results-title')).toHaveText(title);
  // The morning's teams keep their names on the empathy maps after the team sort formed new teams.
  const maps = consolePage.getByTestId('activity-empathy_map');
  for (const [who, team, note] of [
    ['Ana', morning.ana, 'Rows of identical bikes and no signs'],
    ['Dev', morning.dev, 'Worried the bike will not lock'],
  ] as const) {
    expect(team, `${who} had a morning team`).toMatch(/^Team \d$/);
    await expect(maps.getByText(new RegExp(`^${team} \\(\\d\\)$`))).toBeVisible();
    await expect(maps).toContainText(note);
  }
  await expect(maps).not.toContainText(/(^|[^\w])Team \(/);
  // The two-criteria vote: the matrix ranking, "carried forward" only in it.
  const vote = consolePage.getByTestId('activity-dot_vote');
  await expect(vote).toContainText('Ranked by the matrix: Impact high and Effort low first');
  // The prompt names the 2 dots the vote ran with (the plan said 3), as the phones showed it.
  await expect(vote).toContainText('Spend your 2 dots');
  const main = vote.getByTestId('vote-table-main');
  await expect(main.getByTestId('vote-row').first()).toContainText(UNLOCK);
  await expect(main.getByTestId('vote-row').first().getByTestId('vote-row-quadrant')).toHaveText('Impact high · Effort low');
  await expect(main.locator('.badge-chosen')).toHaveCount(2);
  // The plot reads the usual way (common practice): impact up, effort from low (left) to high (right), so the
  // first option of the matrix ranking (Impact high · Effort low, unlocking) sits in the top-left quadrant.
  const plot = vote.getByTestId('criteria-matrix');
  await expect(plot.getByTestId('plot-quadrant-high-low')).toHaveText('Impact high · Effort low');
  const first = plot.getByTestId('plot-point-1');
  // The SVG's plot area runs x 40–404 and y 12–264 (CriteriaMatrixPlot.vue): its middle is 222, 138.
  expect(Number(await first.getAttribute('data-x'))).toBeLessThan(222);
  expect(Number(await first.getAttribute('data-y'))).toBeLessThan(138);
  await plot.screenshot({ path: path.join(OUT, 'results-criteria-matrix.png') });
  await expect(vote.locator('[data-test^="vote-table-"]:not([data-test="vote-table-main"]) .badge-chosen')).toHaveCount(0);
  // The participation table counts the vote's ballots, not notes.
  await expect(consolePage.getByTestId('participation-row').filter({ hasText: 'Pick the challenges' }).getByTestId('contributions')).toHaveText('5 ballots');
  // Eli's photo went with his contributions: Ana's is the one photo held.
  await expect(consolePage.getByTestId('retention-held')).toContainText('1 photo.');
  await consolePage.screenshot({ path: path.join(OUT, `${String(step + 1).padStart(2, '0')}-results-console.png`), fullPage: true });
  expect(scriptErrors).toEqual([]);
});
