import { test, expect } from '@playwright/test';
import { PNG } from 'pngjs';
import { rehearseOwnWorkshop } from './fixtures';

/** A small grey picture, enough for the server's image checks. */
function photoPng(): Buffer {
  const png = new PNG({ width: 64, height: 48 });
  png.data.fill(200);
  return PNG.sync.write(png);
}

test('a phone keeps a note and a photo made offline through a reload, says how many wait, and sends each once when back', async ({
  browser,
  request,
  baseURL,
}) => {
  test.setTimeout(120_000);
  const { auth, workshopId, live, facilitator } = await rehearseOwnWorkshop(request, baseURL!, 'Outbox check for the phones', 'Check the phone keeps what it made offline');
  const { agenda } = (await (await request.get(`/api/workshops/${workshopId}`, { headers: auth })).json()) as { agenda: { id: string; type: string }[] };
  const insights = agenda.findIndex((i) => i.type === 'insights');
  const sketch = agenda.findIndex((i) => i.type === 'sketch');
  const goto = (index: number) => facilitator.timeout(10_000).emitWithAck('session:goto', { index });
  const board = async (index: number) => {
    const answer = (await facilitator.timeout(10_000).emitWithAck('activity:board', { itemId: agenda[index]!.id })) as {
      data: { notes: { kind: string; text: string }[] };
    };
    return answer.data.notes;
  };

  const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
  const page = await context.newPage();
  await page.goto(`/join/${live.joinCode}`);
  await page.getByLabel('Your name for today').fill('Ines');
  await page.getByTestId('consent-yes').click();
  await page.getByTestId('join').click();
  await expect(page.getByTestId('connection')).toHaveText('Connected');

  // A note written offline waits, survives a reload, and goes once when the phone is back.
  await goto(insights);
  await expect(page.getByTestId('note-input')).toBeVisible();
  await page.evaluate(async () => navigator.serviceWorker.ready);
  await context.setOffline(true);
  await page.getByTestId('note-input').fill('The racks are full before nine');
  await page.getByTestId('send-note').click();
  await expect(page.getByTestId('outbox')).toHaveText('1 waiting to be sent');
  await page.reload();
  await expect(page.getByTestId('outbox')).toHaveText('1 waiting to be sent');
  await context.setOffline(false);
  await expect(page.getByTestId('connection')).toHaveText('Connected', { timeout: 20_000 });
  await expect(page.getByTestId('outbox')).toHaveCount(0, { timeout: 20_000 });
  await expect.poll(async () => (await board(insights)).filter((n) => n.text === 'The racks are full before nine').length).toBe(1);

  // A photo taken offline keeps its bytes in IndexedDB through a reload, then uploads once.
  await goto(sketch);
  await expect(page.getByTestId('photo-input')).toBeAttached();
  await context.setOffline(true);
  await page.getByTestId('photo-input').setInputFiles({ name: 'racks.png', mimeType: 'image/png', buffer: photoPng() });
  await page.getByTestId('photo-caption').fill('Racks at nine');
  await page.getByTestId('send-photo').click();
  await expect(page.getByTestId('photo-waiting')).toBeVisible();
  await expect(page.getByTestId('outbox')).toHaveText('1 waiting to be sent');
  await page.reload();
  await expect(page.getByTestId('outbox')).toHaveText('1 waiting to be sent');
  await context.setOffline(false);
  await expect(page.getByTestId('connection')).toHaveText('Connected', { timeout: 20_000 });
  await expect(page.getByTestId('outbox')).toHaveCount(0, { timeout: 20_000 });
  await expect.poll(async () => (await board(sketch)).filter((n) => n.text.includes('Racks at nine')).length).toBe(1);

  facilitator.disconnect();
  await context.close();
  await request.post(`/api/workshops/${workshopId}/live/stop`, { headers: auth });
});
