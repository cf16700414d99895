import { test, expect, type Page } from '@playwright/test';
import { DEMO, expectAccessible, joinPhone, openStartDialog, shot, signIn } from './fixtures';

const TITLE = "A new member's first ride";
const REHEARSAL_NOTE = 'Rehearsal: the dock app froze on the second try';
const DAY_NOTE = 'The day: the map showed no free docks near the station';

/** Sends a note from a phone on the insights item, and waits for the console to show it. */
async function sendNote(consolePage: Page, phone: Page, text: string): Promise<void> {
  await consolePage.getByTestId('timeline-item').filter({ hasText: 'What we learned' }).getByRole('button').click();
  await expect(phone.getByTestId('phone-activity')).toHaveText('What we learned');
  await phone.locator('textarea[data-test="note-input"], [data-test="note-input"] textarea').fill(text);
  await phone.getByTestId('send-note').click();
  await expect(consolePage.getByTestId('note-text').filter({ hasText: text })).toHaveCount(1);
}

async function endSession(consolePage: Page): Promise<void> {
  await consolePage.getByTestId('stop-session').click();
  await consolePage.getByRole('dialog').getByRole('button', { name: 'End the live session' }).click();
  await expect(consolePage.getByTestId('workshop-title')).toBeVisible();
}

test('a rehearsal, then the day: the console starts each afresh, the results cover the day, and the rehearsal can be discarded', async ({ browser }) => {
  test.setTimeout(150_000);
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const consolePage = await context.newPage();
  await signIn(consolePage, DEMO.facilitator);
  await consolePage.getByRole('link', { name: TITLE }).click();

  // The rehearsal: the demo's date is not today, so Cairn offers a rehearsal first.
  await openStartDialog(consolePage);
  await expect(consolePage.getByRole('radio', { name: 'A rehearsal' })).toHaveAttribute('aria-checked', 'true');
  await shot(consolePage, 'sessions-start-dialog');
  await consolePage.getByRole('button', { name: 'Start the session' }).click();
  await expect(consolePage.getByTestId('session-kind')).toHaveText('Rehearsal');
  // Drift runs on the session's own clock on another date: no hundreds of minutes behind plan.
  await expect(consolePage.getByTestId('drift-anchor')).toContainText('Not the workshop’s date');
  await expect(consolePage.getByTestId('drift-label')).toHaveText(/On plan|min (ahead of|behind) plan/);
  expect(Number((await consolePage.getByTestId('drift-label').textContent())!.replace(/\D+/g, '') || '0')).toBeLessThan(5);
  const rehearsalCode = (await consolePage.getByTestId('console-code').textContent())!.trim();
  const robin = await joinPhone(browser, `${new URL(consolePage.url()).origin}/join/${rehearsalCode}`, 'Robin Rehearsal');
  await expect(consolePage.getByTestId('joined-count')).toHaveText('1');
  // Opening the join link again on the same phone comes back as the same person, without typing anything.
  await robin.goto(`/join/${rehearsalCode}`);
  await expect(robin).toHaveURL(/\/phone\//);
  await expect(robin.getByTestId('me-name')).toHaveText('Robin Rehearsal');
  // The back button stays in Cairn.
  await robin.goBack();
  await expect(robin).toHaveURL(/\/phone\//);
  await expect(robin.getByTestId('phone-activity')).toBeVisible();
  await expect(consolePage.getByTestId('joined-count')).toHaveText('1');
  await sendNote(consolePage, robin, REHEARSAL_NOTE);
  await endSession(consolePage);

  // The day: a new session lists nobody from the rehearsal.
  await consolePage.getByTestId('run-live').click();
  await consolePage.getByRole('radio', { name: 'The day itself' }).click();
  await consolePage.getByRole('button', { name: 'Start the session' }).click();
  await expect(consolePage.getByTestId('session-kind')).toHaveText('The day');
  await expect(consolePage.getByTestId('joined-count')).toHaveText('0');
  await expect(consolePage.getByTestId('participant')).toHaveCount(0);
  await expect(consolePage.getByTestId('note-text')).toHaveCount(0);
  const dayCode = (await consolePage.getByTestId('console-code').textContent())!.trim();
  expect(dayCode).not.toBe(rehearsalCode);
  const ana = await joinPhone(browser, `${new URL(consolePage.url()).origin}/join/${dayCode}`, 'Ana Lima');
  await expect(consolePage.getByTestId('joined-count')).toHaveText('1');
  await expect(consolePage.getByTestId('participant')).toHaveCount(1);
  await expect(consolePage.getByTestId('participant')).toContainText('Ana Lima');
  await sendNote(consolePage, ana, DAY_NOTE);
  await expect(consolePage.getByTestId('note-text').filter({ hasText: REHEARSAL_NOTE })).toHaveCount(0);
  await endSession(consolePage);

  // The results cover the day: the rehearsal's note is left out, and each section names its session.
  await consolePage.getByTestId('open-results').click();
  const insights = consolePage.getByTestId('activity-insights');
  await expect(insights.getByTestId('result-note').filter({ hasText: DAY_NOTE })).toHaveCount(1);
  await expect(insights.getByTestId('result-note').filter({ hasText: REHEARSAL_NOTE })).toHaveCount(0);
  await expect(insights.getByTestId('section-session').first()).toContainText(/From The day · /);
  await shot(consolePage, 'sessions-results-day');

  // Every session on request, kept in the address.
  await consolePage.getByTestId('sessions-all').click();
  await expect(consolePage).toHaveURL(/sessions=all/);
  await expect(insights.getByTestId('result-note').filter({ hasText: REHEARSAL_NOTE })).toHaveCount(1);
  await expect(insights.getByTestId('section-session').filter({ hasText: 'From Rehearsal · ' })).toHaveCount(1);

  // The plan lists the sessions; the rehearsal is discarded after a confirmation.
  await consolePage.getByRole('link', { name: 'Back to the plan' }).click();
  await consolePage.getByTestId('tab-sessions').click();
  const rehearsals = consolePage.locator('[data-test="session-row"][data-session-kind="rehearsal"]');
  await expect(rehearsals).toHaveCount(1);
  await expect(rehearsals.getByTestId('session-joined')).toHaveText('1');
  await shot(consolePage, 'sessions-plan-list');
  await expectAccessible(consolePage);
  await rehearsals.getByTestId('discard-session').click();
  await expect(consolePage.getByRole('dialog')).toContainText('cannot be undone');
  await consolePage.getByRole('dialog').getByRole('button', { name: 'Discard the session', exact: true }).click();
  await expect(rehearsals).toHaveCount(0);
  await expect(consolePage.locator('[data-test="session-row"][data-session-kind="day"]').first()).toBeVisible();

  // Nothing of the rehearsal is left, even with every session chosen.
  await consolePage.getByTestId('open-results').click();
  await consolePage.getByTestId('sessions-all').click();
  await expect(insights.getByTestId('result-note').filter({ hasText: DAY_NOTE })).toHaveCount(1);
  await expect(insights.getByTestId('result-note').filter({ hasText: REHEARSAL_NOTE })).toHaveCount(0);
  await context.close();
});
