import { DEFAULT_SEASON_CALENDAR } from '../../shared/season-calendar.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { agent, signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => t.close());

function linkIn(text: string, kind: 'invite' | 'reset') {
  const m = text.match(new RegExp(`http://netput\\.test/${kind}/([A-Za-z0-9_-]+)`));
  if (!m) throw new Error(`no ${kind} link in: ${text}`);
  return m[1];
}

describe('invitations', () => {
  it('an invited user receives a one-time link, chooses a password and is signed in', async () => {
    t.smtp.clear();
    const admin = await signedIn(t.app, 'admin@example.org');
    const created = await admin.post('/api/users/invitations').send({ email: 'New.Planner@Example.org', name: 'Nadia New', role: 'planner' });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ email: 'new.planner@example.org', role: 'planner', status: 'invited' });
    const [mail] = await t.smtp.waitFor(1);
    expect(mail.to).toEqual(['new.planner@example.org']);
    expect(mail.subject).toBe('Your invitation to Larkfield Grain & Supply Co-operative on Netput');
    const token = linkIn(mail.text, 'invite');

    const guest = await agent(t.app);
    const info = await guest.get(`/api/auth/tokens/${token}`);
    expect(info.status).toBe(200);
    expect(info.body).toMatchObject({ purpose: 'invite', email: 'new.planner@example.org', name: 'Nadia New' });
    const short = await guest.post(`/api/auth/tokens/${token}`).send({ password: 'short' });
    expect(short.status).toBe(400);
    expect(short.body.error.details).toEqual([{ path: 'body.password', message: 'Use at least 10 characters' }]);
    const ok = await guest.post(`/api/auth/tokens/${token}`).send({ password: 'a-good-long-password' });
    expect(ok.status).toBe(200);
    expect(ok.body.user.role).toBe('planner');
    expect((await guest.get('/api/auth/me')).body.email).toBe('new.planner@example.org');
    // The link works once.
    expect((await guest.post(`/api/auth/tokens/${token}`).send({ password: 'another-long-password' })).status).toBe(410);
    const users = await admin.get('/api/users');
    expect(users.body.find((u: { email: string }) => u.email === 'new.planner@example.org').status).toBe('active');
  });

  it('inviting an existing address answers 409', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    const res = await admin.post('/api/users/invitations').send({ email: 'planner@example.org', name: 'Again', role: 'planner' });
    expect(res.status).toBe(409);
  });
});

describe('PATCH /api/users/:id', () => {
  it('deactivating an account ends its sessions and stops its sign-in', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    const list = await admin.get('/api/users');
    const id = list.body.find((u: { email: string }) => u.email === 'treasurer@example.org').id;
    const res = await admin.patch(`/api/users/${id}`).send({ active: false });
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('deactivated');
    expect((await treasurer.get('/api/auth/me')).status).toBe(401);
    const again = await agent(t.app);
    const login = await again.post('/api/auth/login').send({ email: 'treasurer@example.org', password: 'netput-demo' });
    expect(login.status).toBe(401);
    await admin.patch(`/api/users/${id}`).send({ active: true });
    const audit = await admin.get('/api/audit');
    expect(audit.body.rows[0]).toMatchObject({ action: 'user.update', entity: 'user', entityId: String(id), actorEmail: 'admin@example.org' });
    expect(audit.body.rows[1].after.status).toBe('deactivated');
  });

  it('an admin cannot demote themself', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    const me = await admin.get('/api/auth/me');
    const res = await admin.patch(`/api/users/${me.body.id}`).send({ role: 'planner' });
    expect(res.status).toBe(409);
  });

  it('an invalid id answers 400 naming params.id', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    const res = await admin.patch('/api/users/abc').send({ name: 'X' });
    expect(res.status).toBe(400);
    expect(res.body.error.details[0].path).toBe('params.id');
  });
});

describe('password reset', () => {
  it('answers 202 for any address and mails a link only to a real account', async () => {
    t.smtp.clear();
    const guest = await agent(t.app);
    expect((await guest.post('/api/auth/password-reset').send({ email: 'nobody@example.org' })).status).toBe(202);
    expect((await guest.post('/api/auth/password-reset').send({ email: 'member@example.org' })).status).toBe(202);
    const mails = await t.smtp.waitFor(1);
    expect(mails).toHaveLength(1);
    expect(mails[0].to).toEqual(['member@example.org']);
    const token = linkIn(mails[0].text, 'reset');
    const res = await guest.post(`/api/auth/tokens/${token}`).send({ password: 'netput-demo-2' });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ email: 'member@example.org', role: 'member' });
    const relog = await agent(t.app);
    expect((await relog.post('/api/auth/login').send({ email: 'member@example.org', password: 'netput-demo' })).status).toBe(401);
  });

  it('an unknown link answers 404', async () => {
    const guest = await agent(t.app);
    expect((await guest.get('/api/auth/tokens/AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA')).status).toBe(404);
  });
});

describe('settings', () => {
  it('the admin saves settings and every role reads them; others may not write', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    const body = { coopName: 'Larkfield Co-op', currency: 'EUR', unitSystem: 'metric', decimalMark: 'comma', storageCapacityT: 61000, handlingCapacityTPerDay: 2400 };
    expect((await admin.put('/api/settings').send(body)).status).toBe(200);
    const planner = await signedIn(t.app, 'planner@example.org');
    // A co-op that saved its settings before the season calendar existed reads the default calendar.
    expect((await planner.get('/api/settings')).body).toEqual({ ...body, seasonCalendar: DEFAULT_SEASON_CALENDAR });
    // Season 2027/28 named for the harvest it grows in 2028: inputs Sep 2027 – Apr 2028, delivery Jul – Aug 2028.
    const cropYear = { inputsFrom: { month: 9, year: 0 }, inputsTo: { month: 4, year: 1 }, cropFrom: { month: 7, year: 1 }, cropTo: { month: 8, year: 1 } };
    expect((await admin.put('/api/settings').send({ ...body, seasonCalendar: cropYear })).status).toBe(200);
    expect((await planner.get('/api/settings')).body.seasonCalendar).toEqual(cropYear);
    const backwards = await admin.put('/api/settings').send({ ...body, seasonCalendar: { ...cropYear, cropTo: { month: 8, year: -1 } } });
    expect(backwards.status).toBe(400);
    expect(backwards.body.error.details).toEqual([
      { path: 'body.seasonCalendar.cropTo', message: 'The last delivery month comes before the first' },
    ]);
    expect((await planner.put('/api/settings').send(body)).status).toBe(403);
    const bad = await admin.put('/api/settings').send({ ...body, currency: 'euro' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details).toEqual([{ path: 'body.currency', message: 'Use a three-letter ISO 4217 code such as EUR' }]);
  });
});

describe('development mail page', () => {
  it('is not mounted outside development mode', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    expect((await admin.get('/api/dev/mail')).status).toBe(404);
    // The screens ask first, so a production server never answers them 404.
    const status = await admin.get('/api/dev/mail/status');
    expect(status.status).toBe(200);
    expect(status.body).toEqual({ available: false });
    const planner = await signedIn(t.app, 'planner@example.org');
    expect((await planner.get('/api/dev/mail/status')).status).toBe(403);
  });
});
