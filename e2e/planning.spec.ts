import { test, expect, type Page } from '@playwright/test';
import { DEMO, shot, signIn } from './fixtures';

// A workshop of its own (not the demo's title), so the specs that look the demo up by name still find it.
const TITLE = 'Repair corner afternoon';

/** The titles of the agenda's rows, top to bottom. */
const titles = (page: Page) => page.getByTestId('item-title').allTextContents().then((t) => t.map((s) => s.trim()));

test('planning a client afternoon: template times, fields aligned, activities added where they belong, nothing typed is lost', async ({ browser }) => {
  test.setTimeout(120_000);
  const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
  const page = await context.newPage();
  await signIn(page, DEMO.facilitator);

  // The New workshop dialog: both templates say their clock times; the date field lines up with the title field.
  await page.getByTestId('new-workshop').click();
  const dialog = page.getByRole('dialog', { name: 'New workshop' });
  await expect(dialog.getByRole('radio', { name: /full-day template \(10:00–16:00\)/ })).toBeVisible();
  await expect(dialog.getByRole('radio', { name: /half-day template \(13:00–17:00\)/ })).toBeVisible();
  // Polled: the dialog slides in, and every box moves until it has. The date field's outline and the template
  // radios' circles line up with the title field's outline.
  const leftEdges = async () =>
    Promise.all([
      // The fields' outlines, not the text boxes inside them.
      ...['new-title', 'new-date'].map((id) => page.getByTestId(id).evaluate((el) => (el.closest('.q-field')?.querySelector('.q-field__control') ?? el).getBoundingClientRect().x)),
      ...(await dialog.getByTestId('template').locator('.q-radio__bg').all()).map(async (circle) => (await circle.boundingBox())!.x),
    ]);
  await expect.poll(async () => (await leftEdges()).length).toBe(5);
  await expect.poll(async () => { const x = await leftEdges(); return Math.max(...x) - Math.min(...x); }).toBeLessThanOrEqual(1);
  await shot(page, 'planning-new-workshop-1280x800');
  await page.getByLabel('Title').fill(TITLE);
  await page.getByLabel('Objective: what should the organisation learn or improve?').fill('Find out what keeps members from fixing their own bikes.');
  await dialog.getByRole('radio', { name: /half-day template/ }).click();
  await page.getByTestId('create-workshop').click();
  await expect(page.getByTestId('workshop-title')).toHaveText(TITLE);
  await expect(page.getByTestId('agenda-item').first().getByTestId('item-time')).toContainText('13:00');
  await expect(page.getByTestId('no-warnings')).toBeVisible();

  // Nothing selected: a new empathy map goes where the empathize phase ends, not after Closing, and keeps the phase order.
  const before = await titles(page);
  const interviews = before.indexOf('Interviews');
  expect(interviews).toBeGreaterThan(0);
  await page.getByTestId('add-activity').click();
  await page.getByTestId('add-empathy_map').click();
  await expect(page.getByTestId('agenda-item')).toHaveCount(before.length + 1);
  expect((await titles(page))[interviews + 1]).toBe('Empathy map');
  // (The 25 more minutes fill the afternoon above the load ceiling: that warning is right, the phase order is kept.)
  await expect(page.locator('[data-test="warning"][data-code="phases_out_of_order"]')).toHaveCount(0);

  // An item selected: a new talk goes right after it, and becomes the selection, so the next one follows it.
  await page.getByTestId('item-title').filter({ hasText: 'Warm-up pairs' }).click();
  await expect(page.getByTestId('item-title').filter({ hasText: 'Warm-up pairs' })).toHaveAttribute('aria-pressed', 'true');
  await expect(page.getByTestId('add-after-hint')).toContainText('New activities go after “Warm-up pairs”');
  await page.getByTestId('add-activity').click();
  await page.getByTestId('add-talk').click();
  await expect(page.getByTestId('add-after-hint')).toContainText('New activities go after “Talk”');
  await page.getByTestId('add-activity').click();
  await page.getByTestId('add-break').click();
  await expect(page.getByTestId('agenda-item')).toHaveCount(before.length + 3);
  const after = await titles(page);
  const warmUp = after.indexOf('Warm-up pairs');
  expect(after.slice(warmUp, warmUp + 3)).toEqual(['Warm-up pairs', 'Talk', 'Break']);
  await shot(page, 'planning-added-after-selection-1280x800');
  for (const [width, height] of [
    [820, 1180],
    [1180, 820],
  ] as const) {
    await page.setViewportSize({ width, height });
    await shot(page, `planning-added-after-selection-${width}x${height}`);
  }
  await page.setViewportSize({ width: 1280, height: 800 });
  await page.getByTestId('unselect-item').click();
  await expect(page.getByTestId('add-after-hint')).toHaveCount(0);

  // The item dialog asks before throwing away a change: on Cancel and on Escape.
  await page.getByTestId('agenda-item').filter({ hasText: 'Talk' }).getByTestId('edit-item').click();
  const itemTitle = page.getByTestId('item-dialog').getByLabel('Title');
  await itemTitle.fill('Talk: how the repair corner works');
  await page.getByTestId('cancel-item').click();
  const ask = page.getByRole('dialog', { name: 'Discard your changes?' });
  await expect(ask).toBeVisible();
  await ask.getByRole('button', { name: 'Keep editing' }).click();
  await expect(ask).toHaveCount(0);
  await expect(itemTitle).toHaveValue('Talk: how the repair corner works');
  await itemTitle.press('Escape');
  await expect(ask).toBeVisible();
  await ask.getByRole('button', { name: 'Discard' }).click();
  await expect(page.getByTestId('item-dialog')).toHaveCount(0);
  expect(await titles(page)).toContain('Talk');
  expect(await titles(page)).not.toContain('Talk: how the repair corner works');

  // The brief saves itself: text typed just before opening the packing list is there on return, and after a reload.
  await page.getByTestId('tab-brief').click();
  const venue = 'Ground floor workshop, ramp at the side door';
  const objective = page.getByLabel('Objective: what the organisation wants to learn or improve');
  await objective.fill('Find out what keeps members from fixing their own bikes, and what tools they miss.');
  await page.getByLabel(/Venue notes/).fill(venue);
  await page.getByTestId('open-packing-list').click();
  await expect(page.locator('[data-test="packing-line"]').first()).toBeVisible();
  await page.goBack();
  await page.getByTestId('tab-brief').click();
  await expect(objective).toHaveValue('Find out what keeps members from fixing their own bikes, and what tools they miss.');
  await expect(page.getByLabel(/Venue notes/)).toHaveValue(venue);
  await page.reload();
  await page.getByTestId('tab-brief').click();
  await expect(page.getByLabel(/Venue notes/)).toHaveValue(venue);
  await expect(page.getByTestId('brief-save-state')).toHaveText('All changes saved');
});
