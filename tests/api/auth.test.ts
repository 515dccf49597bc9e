import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import { agent, signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => t.close());

describe('GET /api/health', () => {
  it('answers ok with the database kind', async () => {
    const res = await supertest(t.app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'ok', database: process.env.NETPUT_TEST_DB === 'postgres' ? 'postgres' : 'pglite' });
  });
});

describe('POST /api/auth/login', () => {
  it('when the password is right, signs in and answers the user', async () => {
    const a = await agent(t.app);
    const res = await a.post('/api/auth/login').send({ email: 'planner@example.org', password: 'netput-demo' });
    expect(res.status).toBe(200);
    expect(res.body.user).toEqual({ id: expect.any(Number), email: 'planner@example.org', name: 'Priya Planner', role: 'planner', farmId: null });
    const cookie = ([] as string[]).concat(res.headers['set-cookie']).find((c) => c.startsWith('netput_sid='))!;
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);
    const me = await a.get('/api/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.role).toBe('planner');
  });

  it('when the password is wrong, answers 401 with the error shape', async () => {
    const a = await agent(t.app);
    const res = await a.post('/api/auth/login').send({ email: 'planner@example.org', password: 'not-the-password' });
    expect(res.status).toBe(401);
    expect(res.body).toEqual({ error: { code: 'invalid_credentials', message: 'The e-mail address or the password is wrong' } });
  });

  it('when the account does not exist, answers the same 401', async () => {
    const a = await agent(t.app);
    const res = await a.post('/api/auth/login').send({ email: 'nobody@example.org', password: 'whatever-123' });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('invalid_credentials');
  });

  it('when the body is invalid, answers 400 listing each field', async () => {
    const a = await agent(t.app);
    const res = await a.post('/api/auth/login').send({ email: 'not-an-email' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid');
    expect(res.body.error.details).toEqual([
      { path: 'body.email', message: 'Enter a valid e-mail address' },
      { path: 'body.password', message: 'Enter your password' },
    ]);
  });

  it('when the X-XSRF-TOKEN header is missing, answers 403 csrf', async () => {
    const a = supertest.agent(t.app);
    await a.get('/api/auth/csrf');
    const res = await a.post('/api/auth/login').send({ email: 'planner@example.org', password: 'netput-demo' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
  });

  it('when the Origin is another site, answers 403 csrf even with the token', async () => {
    const a = await agent(t.app);
    const res = await a.post('/api/auth/login').set('Origin', 'https://evil.example.org').send({ email: 'planner@example.org', password: 'netput-demo' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
  });

  it('gives a fresh session id at every sign-in and ends the old one', async () => {
    const a = await agent(t.app);
    const first = await a.post('/api/auth/login').send({ email: 'admin@example.org', password: 'netput-demo' });
    const sid1 = ([] as string[]).concat(first.headers['set-cookie']).find((c) => c.startsWith('netput_sid='))!.split(';')[0];
    const second = await a.post('/api/auth/login').send({ email: 'admin@example.org', password: 'netput-demo' });
    const sid2 = ([] as string[]).concat(second.headers['set-cookie']).find((c) => c.startsWith('netput_sid='))!.split(';')[0];
    expect(sid2).not.toBe(sid1);
    const old = await supertest(t.app).get('/api/auth/me').set('Cookie', sid1);
    expect(old.status).toBe(401);
  });
});

describe('POST /api/auth/logout', () => {
  it('ends the session', async () => {
    const a = await signedIn(t.app, 'treasurer@example.org');
    expect((await a.post('/api/auth/logout')).status).toBe(204);
    expect((await a.get('/api/auth/me')).status).toBe(401);
  });
});

describe('role checks', () => {
  it('when anonymous, GET /api/users answers 401', async () => {
    const res = await supertest(t.app).get('/api/users');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it.each(['planner@example.org', 'treasurer@example.org', 'member@example.org'])('when %s asks, GET /api/users answers 403', async (email) => {
    const a = await signedIn(t.app, email);
    const res = await a.get('/api/users');
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
  });

  it('when the admin asks, GET /api/users lists every account', async () => {
    const a = await signedIn(t.app, 'admin@example.org');
    const res = await a.get('/api/users');
    expect(res.status).toBe(200);
    expect(res.body).toHaveLength(23);
    expect(res.body.find((u: { email: string }) => u.email === 'member@example.org')).toMatchObject({ role: 'member', farmName: 'Hollybrook Farm', status: 'active' });
  });

  it('a member sees only their own farm', async () => {
    const a = await signedIn(t.app, 'member@example.org');
    const farms = await a.get('/api/farms');
    expect(farms.status).toBe(200);
    expect(farms.body.map((f: { name: string }) => f.name)).toEqual(['Hollybrook Farm']);
    const mine = await a.get('/api/my-farm');
    expect(mine.status).toBe(200);
    expect(mine.body.farm.code).toBe('F01');
    expect(mine.body.records).toHaveLength(20 * 7);
    expect((await a.get('/api/summary')).status).toBe(403);
  });

  it('an unknown API route answers 404 in the error shape', async () => {
    const res = await supertest(t.app).get('/api/nothing-here');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('an oversized JSON body answers 413 without a stack trace', async () => {
    const a = await agent(t.app);
    const res = await a.post('/api/auth/login').set('Content-Type', 'application/json').send(`{"email":"${'a'.repeat(1_100_000)}"}`);
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('too_large');
    expect(JSON.stringify(res.body)).not.toMatch(/at .*\.ts/);
  });
});

describe('sign-in rate limit', () => {
  it('the 11th attempt for one address within 15 minutes answers 429, counted in the database', async () => {
    const a = await agent(t.app);
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++) statuses.push((await a.post('/api/auth/login').send({ email: 'limit@example.org', password: 'wrong-password-x' })).status);
    expect(statuses.slice(0, 10).every((s) => s === 401)).toBe(true);
    expect(statuses[10]).toBe(429);
    const rows = await t.database.db.execute("select hits from rate_limit_hits where key like 'login:%limit@example.org'");
    expect((rows as unknown as { rows: { hits: number }[] }).rows[0].hits).toBe(11);
  });
});

describe('sign-in rate limit and successful sign-ins', () => {
  it('does not count sign-ins that succeed: a person may sign in twelve times in a row', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 12; i++) {
      const a = await agent(t.app);
      statuses.push((await a.post('/api/auth/login').send({ email: 'planner@example.org', password: 'netput-demo' })).status);
    }
    expect(statuses).toEqual(Array(12).fill(200));
  });
});

describe('GET /api/auth/session', () => {
  it('answers 200 with { user: null } when signed out, and the account when signed in', async () => {
    const a = await agent(t.app);
    const out = await a.get('/api/auth/session');
    expect(out.status).toBe(200);
    expect(out.body).toEqual({ user: null });
    await a.post('/api/auth/login').send({ email: 'planner@example.org', password: 'netput-demo' });
    const signedIn = await a.get('/api/auth/session');
    expect(signedIn.status).toBe(200);
    expect(signedIn.body.user).toMatchObject({ email: 'planner@example.org', role: 'planner', farmId: null });
    await a.post('/api/auth/logout').send({});
    expect((await a.get('/api/auth/session')).body).toEqual({ user: null });
  });
});
