import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, createStranger, demoWorkshop, startTestApp, type TestApp } from './helpers';

let t: TestApp;
let owner: string;
let workshopId: string;

/** The last message the local dev SMTP server received for an address. */
function lastMailTo(email: string) {
  const messages = t.cairn.ctx.mail.dev!.messages.filter((m) => m.to.includes(email));
  return messages.at(-1);
}

/** The invitation token in a message's link. */
function tokenIn(text: string): string {
  const m = text.match(/\/invitations\/accept\?token=([A-Za-z0-9_%-]+)/);
  if (!m) throw new Error(`no invitation link in: ${text}`);
  return decodeURIComponent(m[1]);
}

beforeAll(async () => {
  t = await startTestApp();
  owner = await t.tokenFor('facilitator');
  workshopId = (await demoWorkshop(t)).id;
});
afterAll(() => t.close());

describe('inviting by e-mail', () => {
  it('sends an invitation through SMTP; following its link creates an account with the observer role', async () => {
    const email = 'jun.park@harbourlane.example';
    const res = await t.agent
      .post(`/api/workshops/${workshopId}/invitations`)
      .set('Authorization', bearer(owner))
      .send({ email, role: 'observer' });
    expect(res.status).toBe(201);

    // Read the message as the local fake SMTP server received it, and follow its link.
    const mail = lastMailTo(email);
    expect(mail?.subject).toContain("A new member's first ride");
    const token = tokenIn(mail!.text);

    const info = await t.agent.get(`/api/invitations/${encodeURIComponent(token)}`);
    expect(info.status).toBe(200);
    expect(info.body).toMatchObject({ role: 'observer', email, accountExists: false, invitedBy: 'Mira Calder' });

    const accepted = await t.agent
      .post('/api/invitations/accept-new')
      .send({ token, name: 'Jun Park', password: 'a long enough password' });
    expect(accepted.status).toBe(201);
    expect(accepted.body.workshopId).toBe(workshopId);

    const asObserver = bearer(accepted.body.accessToken);
    expect((await t.agent.get(`/api/workshops/${workshopId}`).set('Authorization', asObserver)).body.myRole).toBe('observer');
    expect((await t.agent.patch(`/api/workshops/${workshopId}`).set('Authorization', asObserver).send({ headcount: 20 })).status).toBe(403);

    // The link works once.
    expect((await t.agent.get(`/api/invitations/${encodeURIComponent(token)}`)).status).toBe(404);
  });

  it('lets an existing account accept as co-facilitator, who may then edit but not invite or delete', async () => {
    const stranger = await createStranger(t, 'cofac');
    await t.agent
      .post(`/api/workshops/${workshopId}/invitations`)
      .set('Authorization', bearer(owner))
      .send({ email: stranger.email, role: 'cofacilitator' })
      .expect(201);
    const token = tokenIn(lastMailTo(stranger.email)!.text);
    expect((await t.agent.get(`/api/invitations/${encodeURIComponent(token)}`)).body.accountExists).toBe(true);
    const res = await t.agent.post('/api/invitations/accept').set('Authorization', bearer(stranger.token)).send({ token });
    expect(res.status).toBe(200);

    const as = bearer(stranger.token);
    expect((await t.agent.patch(`/api/workshops/${workshopId}`).set('Authorization', as).send({ headcount: 18 })).status).toBe(200);
    expect(
      (await t.agent.post(`/api/workshops/${workshopId}/invitations`).set('Authorization', as).send({ email: 'x@harbourlane.example', role: 'observer' })).status,
    ).toBe(403);
    expect((await t.agent.delete(`/api/workshops/${workshopId}`).set('Authorization', as)).status).toBe(403);

    const people = await t.agent.get(`/api/workshops/${workshopId}/people`).set('Authorization', bearer(owner));
    expect(people.body.members.map((m: { role: string }) => m.role)).toEqual(expect.arrayContaining(['owner', 'observer', 'cofacilitator']));
  });

  it('refuses inviting someone who already has a role, and a bad e-mail', async () => {
    const again = await t.agent
      .post(`/api/workshops/${workshopId}/invitations`)
      .set('Authorization', bearer(owner))
      .send({ email: 'tomas@harbourlane.example', role: 'observer' });
    expect(again.status).toBe(409);
    const bad = await t.agent
      .post(`/api/workshops/${workshopId}/invitations`)
      .set('Authorization', bearer(owner))
      .send({ email: 'not an address', role: 'observer' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.email).toBeTruthy();
  });

  it('withdraws an invitation so its link stops working', async () => {
    const email = 'ola.berg@harbourlane.example';
    const res = await t.agent
      .post(`/api/workshops/${workshopId}/invitations`)
      .set('Authorization', bearer(owner))
      .send({ email, role: 'cofacilitator' });
    const token = tokenIn(lastMailTo(email)!.text);
    await t.agent.delete(`/api/workshops/${workshopId}/invitations/${res.body.id}`).set('Authorization', bearer(owner)).expect(204);
    expect((await t.agent.get(`/api/invitations/${encodeURIComponent(token)}`)).status).toBe(404);
  });

  it('keeps observers and strangers from inviting', async () => {
    const observer = await t.tokenFor('observer');
    const stranger = await createStranger(t);
    for (const tok of [observer, stranger.token]) {
      const res = await t.agent
        .post(`/api/workshops/${workshopId}/invitations`)
        .set('Authorization', bearer(tok))
        .send({ email: 'someone@harbourlane.example', role: 'observer' });
      expect(res.status).toBe(403);
    }
  });
});
