import { test, expect, type Page } from '@playwright/test';
import AxeBuilder from '@axe-core/playwright';
import { DEMO, joinPhone, runLive, shot, signIn } from './fixtures';

// A workshop of its own (not the demo's title), so the specs that look the demo up by name still find it.
const TITLE = 'Tool shed open evening';
const LIVE_TITLE = 'Tool shed evening, live';
const OPTIONS = ['How might we show which tools are free?', 'How might we make returning a tool quick?', 'How might we welcome a first-time borrower?'];

/** Scans the page with axe-core (no serious or critical finding) and keeps a screenshot of the state scanned. */
async function scan(page: Page, state: string): Promise<void> {
  // A dialog fades in: scanned half-transparent, its text fails contrast that it passes once shown.
  await page.waitForFunction(() => document.getAnimations().every((a) => a.playState !== 'running' || a.effect?.getTiming().iterations === Infinity), undefined, { timeout: 10_000 });
  await shot(page, `a11y-${state}`);
  const results = await new AxeBuilder({ page }).analyze();
  const bad = results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  // Soft, so one run lists the findings of every state.
  expect.soft(bad.map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).join(', ')})`), state).toEqual([]);
}

/** Creates a workshop from the full-day template through the New workshop dialog, scanning the dialog when asked. */
async function createWorkshop(page: Page, title: string, scanDialog = false): Promise<void> {
  await page.getByTestId('new-workshop').click();
  await expect(page.getByRole('dialog', { name: 'New workshop' })).toBeVisible();
  if (scanDialog) await scan(page, 'new-workshop-dialog');
  await page.getByLabel('Title').fill(title);
  await page.getByLabel('Objective: what should the organisation learn or improve?').fill('Find out why members seldom borrow tools in the evening.');
  await page.getByTestId('create-workshop').click();
  await expect(page.getByTestId('workshop-title')).toHaveText(title);
  await expect(page.getByTestId('agenda-item').first()).toBeVisible();
}

// Two tests of about 15 scans each (a few seconds a scan on a busy machine).
test('every planning page state and dialog passes the accessibility scan', async ({ browser }) => {
  test.setTimeout(360_000);
  const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
  const page = await context.newPage();
  await signIn(page, DEMO.facilitator);
  await scan(page, 'workshops');

  // Planning: the New workshop dialog, the plan, the item dialog, the delete confirmation, brief, people, sessions, packing list.
  await createWorkshop(page, TITLE, true);
  await scan(page, 'plan');

  await page.getByTestId('agenda-item').nth(1).getByTestId('edit-item').click();
  await expect(page.getByTestId('item-dialog')).toBeVisible();
  await scan(page, 'agenda-item-dialog');
  await page.getByTestId('cancel-item').click();
  await expect(page.getByTestId('item-dialog')).toHaveCount(0);

  await page.getByTestId('agenda-item').nth(1).getByTestId('delete-item').click();
  await expect(page.getByRole('dialog', { name: 'Delete this item?' })).toBeVisible();
  await scan(page, 'delete-confirmation');
  await page.getByRole('button', { name: 'Cancel' }).click();
  await expect(page.getByRole('dialog')).toHaveCount(0);

  await page.getByTestId('tab-brief').click();
  await expect(page.getByTestId('brief-title')).toBeVisible();
  await scan(page, 'brief');

  await page.getByTestId('tab-people').click();
  await page.getByLabel('E-mail').fill('ines.costa@harbourlane.example');
  await page.getByTestId('send-invitation').click();
  await expect(page.getByTestId('invitation')).toContainText('ines.costa@harbourlane.example');
  await scan(page, 'people');

  await page.getByTestId('tab-sessions').click();
  await expect(page.getByTestId('sessions-panel')).toBeVisible();
  await scan(page, 'sessions');

  await page.getByTestId('open-packing-list').click();
  await expect(page.locator('[data-test="packing-line"]').first()).toBeVisible();
  await scan(page, 'packing-list');

  // The observer's read-only plan.
  const observerContext = await browser.newContext({ viewport: { width: 1280, height: 800 } });
  const observer = await observerContext.newPage();
  await signIn(observer, DEMO.observer);
  await observer.getByRole('link', { name: "A new member's first ride" }).click();
  await expect(observer.getByTestId('agenda-item').first()).toBeVisible();
  await scan(observer, 'plan-observer');
});

test('the live console, projector and phone through a vote, and the results, pass the accessibility scan', async ({ browser }) => {
  test.setTimeout(360_000);
  const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
  const page = await context.newPage();
  await signIn(page, DEMO.facilitator);
  await createWorkshop(page, LIVE_TITLE);

  // Live: the console, the projector and a phone, through a dot vote to its carry-forward list.
  await runLive(page);
  await expect(page.getByTestId('console-activity')).toBeVisible();
  const code = (await page.getByTestId('console-code').textContent())!.trim();
  const projector = await context.newPage();
  await projector.setViewportSize({ width: 1280, height: 720 });
  await projector.goto((await page.getByTestId('open-projector').getAttribute('href'))!);
  await expect(projector.getByTestId('projector-code')).toHaveText(code);
  const joinUrl = `${new URL(page.url()).origin}/join/${code}`;

  const joinContext = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
  const joinPage = await joinContext.newPage();
  await joinPage.goto(joinUrl);
  await expect(joinPage.getByLabel('Your name for today')).toBeVisible();
  await scan(joinPage, 'phone-join');
  await joinContext.close();

  const phone = await joinPhone(browser, joinUrl, 'Ines');
  // The full-day template pins lunch: the drift panel says whether it still starts at its fixed time.
  await expect(page.getByTestId('drift-pinned')).toContainText('“Lunch” starts at its fixed time');
  await scan(page, 'console');
  await scan(projector, 'projector');
  await scan(phone, 'phone');
  // The phone's settings: a button that shows and hides them (a disclosure), Escape hides them again.
  const settings = phone.getByRole('button', { name: 'Your settings' });
  await settings.click();
  await expect(settings).toHaveAttribute('aria-expanded', 'true');
  await expect(phone.getByTestId('my-data-link')).toBeVisible();
  await scan(phone, 'phone-settings');
  await phone.getByTestId('consent-toggle').focus();
  await phone.keyboard.press('Escape');
  await expect(phone.getByTestId('my-data-link')).toHaveCount(0);
  await expect(settings).toBeFocused();

  await page.getByTestId('timeline-item').filter({ hasText: 'Pick the challenges' }).getByRole('button').click();
  const setup = page.getByTestId('vote-setup');
  for (const text of OPTIONS) {
    await setup.getByLabel('New option').fill(text);
    await setup.getByTestId('add-option').click();
  }
  await setup.getByLabel('Carry forward (top N)').fill('2');
  await scan(page, 'console-vote-setup');
  await setup.getByTestId('save-vote').click();
  // The save ends in the vote's controls or in a problem said beside the button; name which, rather than wait out the test.
  await expect(page.getByTestId('open-vote').or(setup.getByTestId('save-vote-problem'))).toBeVisible({ timeout: 30_000 });
  await expect(setup.getByTestId('save-vote-problem'), 'the vote was not saved').toHaveCount(0);
  await page.getByTestId('open-vote').click();
  await expect(phone.getByTestId('dot-option')).toHaveCount(3);
  await phone.getByTestId('dot-option').filter({ hasText: OPTIONS[1]! }).getByTestId('dot-add').click();
  await expect(page.getByTestId('voted-count')).toHaveText('1');
  await expect(page.getByTestId('carry-forward-panel')).toBeVisible();
  await scan(page, 'console-vote-open');
  await scan(projector, 'projector-vote-open');
  await scan(phone, 'phone-vote-open');
  await page.getByTestId('close-vote').click();
  await expect(page.getByTestId('vote-status')).toHaveText('Voting closed');
  await scan(page, 'console-vote-closed-carry-forward');
  await page.getByTestId('reveal').click();
  await expect(projector.getByTestId('projector-results')).toBeVisible();
  await scan(projector, 'projector-vote-revealed');
  await scan(phone, 'phone-vote-closed');
  // One option has the only dot, the two others got none: no tie, but the top two must be filled, and
  // the console says so plainly; the facilitator picks one.
  await expect(page.getByTestId('unvoted-at-cutoff')).toHaveText('To fill the top 2, pick 1 of the 2 options that got no votes.');
  await expect(page.getByTestId('tie-policy')).toContainText('2 options got no votes at all, so this is no tie');
  await expect(page.getByTestId('tied-option').first()).toContainText('(no votes)');
  await page.getByTestId('tied-option').first().getByRole('checkbox').click();
  await scan(page, 'console-tie-picked');
  await page.getByTestId('carry-forward').click();
  await expect(page.getByTestId('carried')).toBeVisible();
  await scan(page, 'console-carried-forward');
  await scan(projector, 'projector-carried-forward');

  await phone.goto(`/phone/${new URL(phone.url()).pathname.split('/')[2]!}/my-data`);
  await expect(phone.getByTestId('my-notes-count')).toBeVisible();
  await scan(phone, 'phone-my-data');

  await page.getByTestId('stop-session').click();
  await expect(page.getByRole('dialog')).toBeVisible();
  await scan(page, 'console-end-confirmation');
  await page.getByRole('dialog').getByRole('button', { name: 'End the live session' }).click();
  await expect(page.getByTestId('workshop-title')).toBeVisible();

  // Results: the page, the send-report dialog, the delete-now confirmation, and the report.
  await page.getByTestId('open-results').click();
  await expect(page.getByTestId('results-title')).toHaveText(LIVE_TITLE);
  await scan(page, 'results');
  await page.getByTestId('open-send').click();
  await expect(page.getByTestId('send-dialog')).toBeVisible();
  await scan(page, 'send-report-dialog');
  await page.keyboard.press('Escape');
  await expect(page.getByTestId('send-dialog')).toHaveCount(0);
  await page.getByTestId('retention-delete-now').click();
  await expect(page.getByTestId('retention-confirm')).toBeVisible();
  await scan(page, 'delete-now-dialog');
  await page.keyboard.press('Escape');
  await expect(page.getByTestId('retention-confirm')).toHaveCount(0);
  await page.getByTestId('open-report').click();
  await expect(page.getByTestId('report-title')).toHaveText(LIVE_TITLE);
  await scan(page, 'report');

});
