import { test, expect, type Page, type Locator } from '@playwright/test';
import fs from 'node:fs';
import AxeBuilder from '@axe-core/playwright';
import { DEMO, SHOTS, shot, signIn } from './fixtures';

/** Drags an agenda row by its handle onto another row, with small mouse steps (the list uses pointer-driven sorting). */
async function dragRow(page: Page, from: Locator, to: Locator): Promise<void> {
  const handle = from.getByTestId('drag-handle');
  const a = (await handle.boundingBox())!;
  const b = (await to.boundingBox())!;
  await page.mouse.move(a.x + a.width / 2, a.y + a.height / 2);
  await page.mouse.down();
  await page.mouse.move(a.x + a.width / 2, a.y + a.height / 2 + 8, { steps: 4 });
  await page.mouse.move(a.x + a.width / 2, b.y + b.height * 0.75, { steps: 20 });
  await page.mouse.move(a.x + a.width / 2, b.y + b.height * 0.8, { steps: 4 });
  await page.mouse.up();
}

test('the facilitator plans a workshop from the full-day template', async ({ page }) => {
  await signIn(page, DEMO.facilitator);
  await page.getByTestId('new-workshop').click();
  await page.getByLabel('Title').fill('Docking stations walk-through');
  await page.getByLabel('Objective: what should the organisation learn or improve?').fill('Find out why new members struggle to dock a bike.');
  await page.getByTestId('create-workshop').click();
  await expect(page.getByTestId('workshop-title')).toHaveText('Docking stations walk-through');

  const rows = page.getByTestId('agenda-item');
  await expect(rows.first()).toBeVisible();
  const count = await rows.count();
  expect(count).toBeGreaterThan(10);
  await expect(page.getByTestId('no-warnings')).toBeVisible();
  await expect(rows.first().getByTestId('item-time')).toContainText('10:00');
  await shot(page, 'plan-from-template');

  // Drag the opening item below the first empathize item: times move and the phase-order rule warns.
  const first = rows.nth(0);
  const firstTitle = (await first.getByTestId('item-title').textContent())!;
  const secondTitle = (await rows.nth(1).getByTestId('item-title').textContent())!;
  await dragRow(page, first, rows.nth(3));
  await expect(rows.first().getByTestId('item-title')).not.toHaveText(firstTitle);
  await expect(rows.first().getByTestId('item-title')).toHaveText(secondTitle);
  const moved = rows.filter({ hasText: firstTitle }).first();
  await expect(moved.getByTestId('item-time')).not.toContainText('10:00');
  await expect(page.locator('[data-test="warning"][data-code="phases_out_of_order"]')).toBeVisible();
  await shot(page, 'plan-after-drag');

  // The order is stored: it survives a reload.
  await page.reload();
  await expect(page.getByTestId('agenda-item').first().getByTestId('item-title')).toHaveText(secondTitle);
  await expect(page.locator('[data-test="warning"][data-code="phases_out_of_order"]')).toBeVisible();

  // Cautions are on the plan.
  await expect(page.locator('[data-test="caution"][data-code="room_capacity"]')).toBeVisible();

  const a11y = await new AxeBuilder({ page }).analyze();
  expect(a11y.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => v.id)).toEqual([]);

  // The packing list: quantities for the headcount, ticked off, printed.
  await page.getByTestId('open-packing-list').click();
  const dots = page.locator('[data-test="packing-line"][data-key="dot_stickers"]');
  await expect(dots).toBeVisible();
  await expect(dots.getByTestId('quantity')).toContainText('dots');
  await dots.getByRole('checkbox').click();
  await expect(dots.getByRole('checkbox')).toHaveAttribute('aria-checked', 'true');
  await page.reload();
  await expect(page.locator('[data-test="packing-line"][data-key="dot_stickers"]').getByRole('checkbox')).toHaveAttribute('aria-checked', 'true');
  await page.emulateMedia({ media: 'print' });
  await expect(page.getByTestId('print')).toBeHidden();
  await shot(page, 'packing-list-print');
  fs.mkdirSync(SHOTS, { recursive: true });
  await page.pdf({ path: `${SHOTS}/packing-list.pdf`, format: 'A4' });
  expect(fs.statSync(`${SHOTS}/packing-list.pdf`).size).toBeGreaterThan(1000);
});

test('an observer reads the plan but cannot change it', async ({ page }) => {
  await signIn(page, DEMO.observer);
  await page.getByRole('link', { name: "A new member's first ride" }).click();
  await expect(page.getByTestId('agenda-item').first()).toBeVisible();
  await expect(page.getByTestId('add-activity')).toHaveCount(0);
  await expect(page.getByTestId('drag-handle')).toHaveCount(0);
});
