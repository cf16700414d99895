import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import jwt from 'jsonwebtoken';
import { DEMO_ACCOUNTS } from '../../server/db/seed';
import { joinBaseUrl } from '../../server/common/network';
import { bearer, createStranger, demoUserId, startTestApp, TEST_SECRET, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

const facilitator = DEMO_ACCOUNTS.facilitator;

/** The `cairn_refresh` cookie pair (`name=value`) a response sets, or undefined. */
function refreshCookie(res: { headers: Record<string, unknown> }): string | undefined {
  const raw = res.headers['set-cookie'];
  const cookies = Array.isArray(raw) ? (raw as string[]) : typeof raw === 'string' ? [raw] : [];
  return cookies.find((c) => c.startsWith('cairn_refresh='))?.split(';')[0];
}

function base64url(value: unknown): string {
  return Buffer.from(JSON.stringify(value)).toString('base64url');
}

function me(token: string) {
  return t.agent.get('/api/auth/me').set('Authorization', bearer(token));
}

describe('sign-in', () => {
  it('answers a token that works and sets the refresh cookie HttpOnly on /api/auth', async () => {
    const res = await t.agent.post('/api/auth/sign-in').send({ email: facilitator.email, password: facilitator.password });
    expect(res.status).toBe(200);
    expect(res.body.accessToken).toEqual(expect.any(String));
    expect(res.body.expiresInSec).toBe(900);
    expect(res.body.user).toMatchObject({ email: facilitator.email, role: 'facilitator' });
    expect(res.body.user).not.toHaveProperty('passwordHash');

    const cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith('cairn_refresh='));
    expect(cookie).toBeDefined();
    expect(cookie).toMatch(/;\s*HttpOnly/i);
    expect(cookie).toMatch(/;\s*Path=\/api\/auth/i);
    expect(cookie).toMatch(/;\s*SameSite=Strict/i);

    const who = await me(res.body.accessToken);
    expect(who.status).toBe(200);
    expect(who.body.email).toBe(facilitator.email);
  });

  it('accepts the e-mail in any case and with spaces around it', async () => {
    const res = await t.agent.post('/api/auth/sign-in').send({ email: `  ${facilitator.email.toUpperCase()} `, password: facilitator.password });
    expect(res.status).toBe(200);
  });

  it('refuses a wrong password with 401 wrong_credentials and a clear message', async () => {
    const res = await t.agent.post('/api/auth/sign-in').send({ email: facilitator.email, password: 'not the password' });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('wrong_credentials');
    expect(res.body.error.message).toBe('That e-mail and password do not match an account');
    expect(refreshCookie(res)).toBeUndefined();
  });

  it('answers an unknown e-mail exactly like a wrong password, so accounts cannot be discovered', async () => {
    const wrong = await t.agent.post('/api/auth/sign-in').send({ email: facilitator.email, password: 'not the password' });
    const unknown = await t.agent.post('/api/auth/sign-in').send({ email: 'nobody@harbourlane.example', password: 'not the password' });
    expect(unknown.status).toBe(401);
    expect(unknown.body).toEqual(wrong.body);
  });
});

describe('refresh and sign-out', () => {
  it('exchanges the refresh cookie for a new access token', async () => {
    const s = await createStranger(t, 'refresh');
    const signIn = await t.agent.post('/api/auth/sign-in').send({ email: s.email, password: s.password });
    const cookie = refreshCookie(signIn)!;
    const res = await t.agent.post('/api/auth/refresh').set('Cookie', cookie);
    expect(res.status).toBe(200);
    expect(res.body.user.email).toBe(s.email);
    expect((await me(res.body.accessToken)).status).toBe(200);
    expect(refreshCookie(res)).toBeDefined();
  });

  it('refuses a refresh with no cookie, a bad cookie, or an access token in the cookie', async () => {
    const s = await createStranger(t, 'refresh-bad');
    expect((await t.agent.post('/api/auth/refresh')).status).toBe(401);
    expect((await t.agent.post('/api/auth/refresh').set('Cookie', 'cairn_refresh=not-a-token')).status).toBe(401);
    const res = await t.agent.post('/api/auth/refresh').set('Cookie', `cairn_refresh=${s.token}`);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it('refuses a refresh token used as an access token', async () => {
    const s = await createStranger(t, 'refresh-as-access');
    const signIn = await t.agent.post('/api/auth/sign-in').send({ email: s.email, password: s.password });
    const refresh = refreshCookie(signIn)!.split('=')[1];
    expect((await me(refresh)).status).toBe(401);
  });

  it('makes the refresh cookie and the access token useless after sign-out', async () => {
    const s = await createStranger(t, 'sign-out');
    const signIn = await t.agent.post('/api/auth/sign-in').send({ email: s.email, password: s.password });
    const cookie = refreshCookie(signIn)!;
    const out = await t.agent.post('/api/auth/sign-out').set('Cookie', cookie);
    expect(out.status).toBe(204);
    // The cookie is cleared in the browser...
    expect(refreshCookie(out)).toMatch(/^cairn_refresh=$/);
    // ...and a copy kept elsewhere no longer works.
    const again = await t.agent.post('/api/auth/refresh').set('Cookie', cookie);
    expect(again.status).toBe(401);
    expect((await me(signIn.body.accessToken)).status).toBe(401);
  });

  it('signs out quietly with no cookie', async () => {
    expect((await t.agent.post('/api/auth/sign-out')).status).toBe(204);
  });
});

describe('password change', () => {
  it('refuses a wrong current password with 400, then changes it and ends the old sessions', async () => {
    const s = await createStranger(t, 'password');
    const wrong = await t.agent
      .post('/api/auth/password')
      .set('Authorization', bearer(s.token))
      .send({ currentPassword: 'not my password', newPassword: 'a brand new password' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.code).toBe('wrong_credentials');
    expect(wrong.body.error.fields).toHaveProperty('currentPassword');
    expect((await me(s.token)).status).toBe(200);

    const ok = await t.agent
      .post('/api/auth/password')
      .set('Authorization', bearer(s.token))
      .send({ currentPassword: s.password, newPassword: 'a brand new password' });
    expect(ok.status).toBe(200);
    expect((await me(ok.body.accessToken)).status).toBe(200);

    expect((await me(s.token)).status).toBe(401);
    const old = await t.agent.post('/api/auth/sign-in').send({ email: s.email, password: s.password });
    expect(old.status).toBe(401);
    const fresh = await t.agent.post('/api/auth/sign-in').send({ email: s.email, password: 'a brand new password' });
    expect(fresh.status).toBe(200);
  });

  it('refuses a new password shorter than 10 characters', async () => {
    const s = await createStranger(t, 'short');
    const res = await t.agent
      .post('/api/auth/password')
      .set('Authorization', bearer(s.token))
      .send({ currentPassword: s.password, newPassword: 'short' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.fields.newPassword).toBe('Use at least 10 characters');
  });
});

describe('sign-up', () => {
  const newcomer = () => ({
    email: `newcomer-${Math.random().toString(36).slice(2, 8)}@harbourlane.example`,
    name: 'Ada Newcomer',
    password: 'a newcomer password',
  });

  it('is refused with signup_closed by default', async () => {
    expect((await t.agent.get('/api/auth/options')).body).toEqual({ signupOpen: false });
    const res = await t.agent.post('/api/auth/sign-up').send(newcomer());
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('signup_closed');
    expect(res.body.error.message).toMatch(/admin/);
  });

  it('is allowed when ALLOW_SIGNUP=true, as a facilitator', async () => {
    const open = await startTestApp({ ALLOW_SIGNUP: 'true' });
    try {
      expect((await open.agent.get('/api/auth/options')).body).toEqual({ signupOpen: true });
      const body = newcomer();
      const res = await open.agent.post('/api/auth/sign-up').send(body);
      expect(res.status).toBe(201);
      expect(res.body.user).toMatchObject({ email: body.email, role: 'facilitator' });
      expect(refreshCookie(res)).toBeDefined();
      const twice = await open.agent.post('/api/auth/sign-up').send(body);
      expect(twice.status).toBe(409);
      expect(twice.body.error.code).toBe('conflict');
    } finally {
      await open.close();
    }
  });

  it('is allowed after the admin opens it through PUT /api/settings, and refused again once closed', async () => {
    const admin = await t.tokenFor('admin');
    const opened = await t.agent.put('/api/settings').set('Authorization', bearer(admin)).send({ signupOpen: true });
    expect(opened.status).toBe(200);
    expect(opened.body).toEqual({ signupOpen: true, signupByConfig: false });
    try {
      const res = await t.agent.post('/api/auth/sign-up').send(newcomer());
      expect(res.status).toBe(201);
      expect(res.body.user.role).toBe('facilitator');
    } finally {
      await t.agent.put('/api/settings').set('Authorization', bearer(admin)).send({ signupOpen: false });
    }
    expect((await t.agent.post('/api/auth/sign-up').send(newcomer())).body.error.code).toBe('signup_closed');
  });
});

describe('password reset', () => {
  /** The token in the reset link of the newest message to `email`. */
  function resetTokenSentTo(email: string): string {
    const messages = t.cairn.ctx.mail.dev!.messages.filter((m) => m.to.includes(email));
    const text = messages.at(-1)?.text ?? '';
    const link = /(https?:\/\/\S+\/reset-password\?token=([^&\s]+)\S*)/.exec(text);
    if (!link) throw new Error(`no reset link in: ${text}`);
    return decodeURIComponent(link[2]);
  }

  it('mails a link whose token sets a new password once', async () => {
    const s = await createStranger(t, 'reset');
    const asked = await t.agent.post('/api/auth/password-reset').send({ email: s.email });
    expect(asked.status).toBe(202);
    expect(asked.body).toEqual({ sent: true });

    // The mail goes after the answer (so the answer takes as long for unknown addresses).
    for (let waited = 0; !t.cairn.ctx.mail.dev!.messages.some((m) => m.to.includes(s.email)) && waited < 5000; waited += 20) {
      await new Promise((r) => setTimeout(r, 20));
    }
    const message = t.cairn.ctx.mail.dev!.messages.find((m) => m.to.includes(s.email));
    expect(message?.subject).toBe('Reset your Cairn password');
    // The link's base comes from the configuration (PUBLIC_URL, else the local network address), never the request.
    expect(message?.text).toContain(`${joinBaseUrl(t.cairn.ctx.config)}/reset-password?token=`);
    const token = resetTokenSentTo(s.email);

    const confirm = await t.agent.post('/api/auth/password-reset/confirm').send({ token, newPassword: 'the reset password' });
    expect(confirm.status).toBe(204);
    expect((await t.agent.post('/api/auth/sign-in').send({ email: s.email, password: 'the reset password' })).status).toBe(200);
    expect((await t.agent.post('/api/auth/sign-in').send({ email: s.email, password: s.password })).status).toBe(401);
    // The reset ends the sessions that were open before it.
    expect((await me(s.token)).status).toBe(401);

    const reuse = await t.agent.post('/api/auth/password-reset/confirm').send({ token, newPassword: 'another reset password' });
    expect(reuse.status).toBe(400);
    expect(reuse.body.error.message).toMatch(/no longer valid/);
    expect((await t.agent.post('/api/auth/sign-in').send({ email: s.email, password: 'another reset password' })).status).toBe(401);
  });

  it('answers the same for an unknown e-mail and sends nothing', async () => {
    const before = t.cairn.ctx.mail.dev!.messages.length;
    const res = await t.agent.post('/api/auth/password-reset').send({ email: 'nobody@harbourlane.example' });
    expect(res.status).toBe(202);
    expect(res.body).toEqual({ sent: true });
    await new Promise((r) => setTimeout(r, 300));
    expect(t.cairn.ctx.mail.dev!.messages.length).toBe(before);
  });

  it('refuses a made-up token', async () => {
    const res = await t.agent
      .post('/api/auth/password-reset/confirm')
      .send({ token: 'made-up-token-that-was-never-sent', newPassword: 'the reset password' });
    expect(res.status).toBe(400);
  });

  // The dev inbox holds reset links: only an admin may read it, never phones on the venue Wi-Fi.
  it('does not let a signed-out caller read a reset link from the dev inbox (NODE_ENV=development)', async () => {
    const dev = await startTestApp({ NODE_ENV: 'development' });
    try {
      await dev.agent.post('/api/auth/password-reset').send({ email: DEMO_ACCOUNTS.admin.email });
      const inbox = await dev.agent.get('/api/dev/mail');
      expect(JSON.stringify(inbox.body)).not.toMatch(/reset-password\?token=/);
    } finally {
      await dev.close();
    }
  });
});

describe('tokens', () => {
  let userId: string;
  let realToken: string;
  beforeAll(async () => {
    userId = await demoUserId(t, 'observer');
    realToken = await t.tokenFor('observer');
  });

  it('accepts the real token (control)', async () => {
    expect((await me(realToken)).status).toBe(200);
  });

  it('refuses an alg:none token', async () => {
    const now = Math.floor(Date.now() / 1000);
    const forged = [
      base64url({ alg: 'none', typ: 'JWT' }),
      base64url({ kind: 'user', sub: userId, tv: 0, iat: now, exp: now + 600 }),
      '',
    ].join('.');
    const res = await me(forged);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it('refuses an expired token with token_expired', async () => {
    const expired = jwt.sign({ kind: 'user', tv: 0 }, TEST_SECRET, { algorithm: 'HS256', subject: userId, expiresIn: -10 });
    const res = await me(expired);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('token_expired');
    expect(res.body.error.message).toMatch(/expired/);
  });

  it('refuses a token signed with another secret', async () => {
    const other = jwt.sign({ kind: 'user', tv: 0 }, 'another secret that is also thirty-two characters long', {
      algorithm: 'HS256',
      subject: userId,
      expiresIn: 600,
    });
    const res = await me(other);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it('refuses a token signed with another algorithm and the same secret', async () => {
    const hs512 = jwt.sign({ kind: 'user', tv: 0 }, TEST_SECRET, { algorithm: 'HS512', subject: userId, expiresIn: 600 });
    expect((await me(hs512)).status).toBe(401);
  });

  it('refuses a tampered payload', async () => {
    const adminId = await demoUserId(t, 'admin');
    const [header, payload, signature] = realToken.split('.');
    const claims = JSON.parse(Buffer.from(payload, 'base64url').toString('utf8'));
    const tampered = [header, base64url({ ...claims, sub: adminId }), signature].join('.');
    const res = await me(tampered);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it('refuses a well-signed token with claims Cairn does not sign', async () => {
    const odd = jwt.sign({ kind: 'superuser', tv: 0 }, TEST_SECRET, { algorithm: 'HS256', subject: userId, expiresIn: 600 });
    expect((await me(odd)).status).toBe(401);
  });

  it('refuses a malformed Authorization header as signed out', async () => {
    const res = await t.agent.get('/api/auth/me').set('Authorization', `Token ${realToken}`);
    expect(res.status).toBe(401);
  });
});

describe('validation and body limits', () => {
  it('refuses a bad e-mail with 400 validation_failed and fields.email', async () => {
    const res = await t.agent.post('/api/auth/sign-in').send({ email: 'not an e-mail', password: 'whatever' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.fields.email).toBe('Enter a valid e-mail address');
    expect(res.body.error.message).toMatch(/fields that need fixing/);
  });

  it('refuses a JSON body over 100 kB with 413 payload_too_large', async () => {
    const res = await t.agent
      .post('/api/auth/sign-in')
      .send({ email: facilitator.email, password: 'x'.repeat(110 * 1024) });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
  });

  it('refuses a body that is not valid JSON with 400', async () => {
    const res = await t.agent.post('/api/auth/sign-in').set('Content-Type', 'application/json').send('{"email": "mira@');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad_request');
    expect(res.body.error.message).toMatch(/not valid JSON/);
  });

  it('answers an unknown API route with 404 in the one error format', async () => {
    const res = await t.agent.get('/api/no-such-route');
    expect(res.status).toBe(404);
    expect(res.body).toEqual({ error: { code: 'not_found', message: expect.any(String) } });
  });
});
