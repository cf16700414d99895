import { test, expect, type Page } from '@playwright/test';
import { DEMO, expectAccessible, joinPhone, runLive, shot, signIn } from './fixtures';

/** Clicks the add-a-dot button of an option under one criterion on a phone. */
async function addDot(page: Page, criterionId: string, option: string): Promise<void> {
  const row = page.getByTestId(`criterion-${criterionId}`).getByTestId('dot-option').filter({ hasText: option });
  const before = await page.getByTestId(`dots-left-${criterionId}`).textContent();
  await row.getByTestId('dot-add').click();
  await expect(page.getByTestId(`dots-left-${criterionId}`)).not.toHaveText(before ?? '');
}

// Harbour Lane Bike Co-op's challenges for a new member's first ride; no digits, so any number on the projector would be a tally.
const DOCK = 'How might we help a new member find a free dock?';
const UNLOCK = 'How might we make unlocking a bike obvious?';
const ROUTE = 'How might we suggest a calm first route?';
const HELMET = 'How might we lend helmets at the dock?';

test('a dot vote with two criteria tallied live, revealed, carried forward into a team sort, and every phone shows its team', async ({ browser }) => {
  // Six browser contexts on a shared two-core machine: the vote and the team sort alone took over 90 s under load.
  test.setTimeout(180_000);
  const consoleContext = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const consolePage = await consoleContext.newPage();
  await signIn(consolePage, DEMO.facilitator);
  await consolePage.getByRole('link', { name: "A new member's first ride" }).click();
  await runLive(consolePage);
  await expect(consolePage.getByTestId('console-activity')).toBeVisible();
  const code = (await consolePage.getByTestId('console-code').textContent())!.trim();

  const projector = await consoleContext.newPage();
  await projector.setViewportSize({ width: 1600, height: 900 });
  await projector.goto((await consolePage.getByTestId('open-projector').getAttribute('href'))!);
  await expect(projector.getByTestId('projector-code')).toHaveText(code);

  const joinUrl = `${new URL(consolePage.url()).origin}/join/${code}`;
  const names = ['Ana', 'Ben', 'Cleo', 'Dev', 'Eli'];
  const phones = await Promise.all(names.map((n) => joinPhone(browser, joinUrl, n)));
  await expect(consolePage.getByTestId('online-count')).toHaveText('5');

  // Straight to the dot vote from the console's timeline.
  await consolePage.getByTestId('timeline-item').filter({ hasText: 'Pick the challenges' }).getByRole('button').click();
  await expect(consolePage.getByTestId('console-activity')).toHaveText('Pick the challenges');
  for (const p of phones) await expect(p.getByTestId('vote-waiting')).toBeVisible();

  // Set the vote up: four typed options, impact and effort, top two.
  const setup = consolePage.getByTestId('vote-setup');
  for (const text of [DOCK, UNLOCK, ROUTE, HELMET]) {
    await setup.getByLabel('New option').fill(text);
    await setup.getByTestId('add-option').click();
  }
  await expect(setup.getByTestId('setup-option')).toHaveCount(4);
  // Four options: two dots each, the budget Cairn suggests (a third of the options, Global Learning Partners).
  await expect(setup.getByLabel('Dots per voter')).toHaveValue('2');
  await setup.getByTestId('impact-effort').click();
  await setup.getByLabel('Carry forward (top N)').fill('2');
  await setup.getByTestId('save-vote').click();
  await consolePage.getByTestId('open-vote').click();
  await expect(consolePage.getByTestId('vote-status')).toHaveText('Voting open');

  // The projector lists the options and the criteria, with no numbers.
  const projectorVote = projector.getByTestId('vote-projector');
  await expect(projectorVote.getByTestId('projector-options')).toContainText(DOCK);
  await expect(projectorVote).not.toContainText(/[0-9]/);

  // At 360 px the sticky line (criterion and dots left) stays one line; what a dot means sits below it.
  await phones[0]!.setViewportSize({ width: 360, height: 640 });
  for (const c of ['impact', 'effort']) {
    const left = phones[0]!.getByTestId(`dots-left-${c}`);
    const meaning = phones[0]!.getByTestId(`criterion-meaning-${c}`);
    await expect(meaning).toBeVisible();
    await expect
      .poll(() =>
        left.evaluate((el, m) => {
          const head = el.parentElement!.getBoundingClientRect();
          const line = parseFloat(getComputedStyle(el).lineHeight) || el.getBoundingClientRect().height;
          const pad = parseFloat(getComputedStyle(el.parentElement!).paddingTop) + parseFloat(getComputedStyle(el.parentElement!).paddingBottom);
          const mean = document.querySelector(`[data-test="criterion-meaning-${m}"]`)!;
          return { oneLine: head.height - pad < 2 * line, inside: el.parentElement!.contains(mean), below: mean.getBoundingClientRect().top >= head.bottom - 0.5 };
        }, c),
      )
      .toEqual({ oneLine: true, inside: false, below: true });
  }
  await phones[0]!.setViewportSize({ width: 390, height: 844 });

  // Five phones vote; the console's tally follows each one.
  for (const [i, p] of phones.entries()) {
    await expect(p.getByTestId('dot-option')).toHaveCount(8);
    await addDot(p, 'impact', DOCK);
    await addDot(p, 'impact', i === 4 ? ROUTE : UNLOCK);
    await addDot(p, 'effort', DOCK);
    // The impact budget is spent: no more impact dots anywhere.
    await expect(p.getByTestId('criterion-impact').getByTestId('dot-add').first()).toBeDisabled();
    await expect(p.getByTestId('dots-left-impact')).toHaveText('0 of 2 dots left');
    await expect(consolePage.getByTestId('voted-count')).toHaveText(String(i + 1));
    await expect(projectorVote).not.toContainText(/[0-9]/);
  }
  await expect(consolePage.getByTestId('dots-left-room')).toHaveText('5');
  const dockRow = consolePage.getByTestId('tally-row').filter({ hasText: DOCK });
  await expect(dockRow.getByTestId('tally-dots')).toHaveText('10');
  await expect(consolePage.getByTestId('tally-row').first()).toContainText(DOCK);
  await expect(consolePage.getByTestId('criteria-matrix')).toContainText(DOCK);
  await shot(consolePage, 'voting-console-tally');
  await shot(phones[0]!, 'voting-phone-dots');
  await shot(projector, 'voting-projector-hidden');
  await expect(projector.getByTestId('projector-results')).toHaveCount(0);

  // Close, reveal, and carry the top two forward.
  await consolePage.getByTestId('close-vote').click();
  await expect(consolePage.getByTestId('vote-status')).toHaveText('Voting closed');
  await expect(phones[0]!.getByTestId('vote-closed')).toBeVisible();
  await consolePage.getByTestId('reveal').click();
  await expect(projector.getByTestId('projector-results')).toBeVisible();
  // Every option in full, in rank order, with its marks counted beside them; the matrix names options by their place in that list.
  await expect(projector.getByTestId('dot-row').first()).toContainText(DOCK);
  await expect(projector.getByTestId('dot-row').first().getByTestId('dot-count')).toHaveText(['A 5', 'B 5']);
  await expect(projector.getByTestId('criteria-matrix')).toBeVisible();
  await consolePage.getByTestId('carry-forward').click();
  await expect(consolePage.getByTestId('carried')).toBeVisible();
  await expect(consolePage.getByTestId('carry-forward-panel')).toContainText(UNLOCK);
  await expect(projector.getByTestId('projector-chosen')).toContainText(UNLOCK);
  await shot(projector, 'voting-projector-revealed');
  await expectAccessible(consolePage);
  await expectAccessible(projector);
  await expectAccessible(phones[0]!);

  // The team sort: the two carried-forward challenges become teams.
  await consolePage.getByTestId('timeline-item').filter({ hasText: 'Form the teams' }).getByRole('button').click();
  await expect(consolePage.getByTestId('console-activity')).toHaveText('Form the teams');
  await consolePage.getByTestId('use-winners').click();
  await expect(consolePage.getByTestId('setup-option')).toHaveCount(2);
  await consolePage.getByTestId('save-vote').click();
  await consolePage.getByTestId('open-vote').click();
  for (const [i, p] of phones.entries()) {
    await expect(p.getByTestId('rank-item')).toHaveCount(2);
    // Two people want the unlocking challenge first; the rest keep the order they were shown and send it.
    if (i >= 3 && !(await p.getByTestId('rank-item').first().textContent())!.includes(UNLOCK)) {
      await p.getByTestId('rank-item').first().getByTestId('rank-down').click();
    }
    await p.getByTestId('send-ranking').click();
    await expect(p.getByTestId('ranking-sent')).toBeVisible();
  }
  await expect(consolePage.getByTestId('voted-count')).toHaveText('5');
  await consolePage.getByTestId('close-vote').click();
  await consolePage.getByTestId('propose-teams').click();
  await expect(consolePage.getByTestId('proposed-team')).toHaveCount(2);
  await expect(consolePage.getByTestId('proposed-member')).toHaveCount(5);
  const sizes = await consolePage.getByTestId('proposed-team').evaluateAll((teams) => teams.map((t) => t.querySelectorAll('[data-test="proposed-member"]').length));
  expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(1);
  await shot(consolePage, 'voting-console-teams');
  await consolePage.getByTestId('confirm-teams').click();
  await expect(consolePage.getByTestId('confirmed-teams')).toBeVisible();

  for (const p of phones) {
    await expect(p.getByTestId('my-team')).toBeVisible();
    await expect(p.getByTestId('my-team-challenge')).toHaveText(new RegExp(`^(${[DOCK, UNLOCK].map((s) => s.replace(/[?]/g, '\\?')).join('|')})$`));
  }
  await shot(phones[3]!, 'voting-phone-team');
});
