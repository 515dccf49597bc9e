import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import { agent, signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => t.close());

describe('headers', () => {
  it('sends a strict Content-Security-Policy and no framework banner', async () => {
    const res = await supertest(t.app).get('/api/health');
    const csp = res.headers['content-security-policy'];
    expect(csp).toMatch(/default-src 'self'/);
    expect(csp).toMatch(/script-src 'self'(;|$)/);
    expect(csp).toMatch(/object-src 'none'/);
    expect(csp).toMatch(/frame-ancestors 'self'/);
    expect(res.headers['x-powered-by']).toBeUndefined();
    expect(res.headers['x-content-type-options']).toBe('nosniff');
  });

  it('the XSRF cookie is readable by the page but strict; the session cookie is httpOnly', async () => {
    const res = await supertest(t.app).get('/api/auth/csrf');
    const xsrf = ([] as string[]).concat(res.headers['set-cookie']).find((c) => c.startsWith('XSRF-TOKEN='))!;
    expect(xsrf).toMatch(/SameSite=Strict/);
    expect(xsrf).not.toMatch(/HttpOnly/);
  });
});

describe('session fixation', () => {
  it('a session id planted before sign-in is never adopted', async () => {
    const a = await agent(t.app);
    const planted = 'planted-session-token-aaaaaaaaaaaaaaaaaaaaaa';
    const res = await a.post('/api/auth/login').set('Cookie', `netput_sid=${planted}`).send({ email: 'planner@example.org', password: 'netput-demo' });
    expect(res.status).toBe(200);
    const sid = ([] as string[]).concat(res.headers['set-cookie']).find((c) => c.startsWith('netput_sid='))!;
    expect(sid).not.toContain(planted);
    expect((await supertest(t.app).get('/api/auth/me').set('Cookie', `netput_sid=${planted}`)).status).toBe(401);
  });
});

describe('lockout', () => {
  it('ten wrong passwords in a row lock the account even from different addresses', async () => {
    for (let i = 0; i < 10; i++) {
      const a = await agent(t.app);
      const res = await a
        .post('/api/auth/login')
        .set('X-Forwarded-For', `198.51.100.${i + 1}`)
        .send({ email: 'treasurer@example.org', password: `wrong-password-${i}` });
      expect(res.status).toBe(401);
    }
    const a = await agent(t.app);
    const res = await a.post('/api/auth/login').set('X-Forwarded-For', '198.51.100.99').send({ email: 'treasurer@example.org', password: 'netput-demo' });
    expect(res.status).toBe(429);
    expect(res.body.error.code).toBe('locked');
  });
});

describe('filter parameters refuse SQL', () => {
  const attempts = ["1;drop table users", "1' or '1'='1", '1) union select password_hash from users --', '-1', '1,,2', '%27'];
  const routes = ['/api/prices', '/api/prices/series', '/api/records', '/api/records/land', '/api/audit'];
  const params: Record<string, string[]> = {
    '/api/prices': ['items', 'seasons', 'deliveryPoints'],
    '/api/prices/series': ['items', 'deflator'],
    '/api/records': ['farms', 'seasons'],
    '/api/records/land': ['farms'],
    '/api/audit': ['limit', 'offset'],
  };
  it.each(routes)('%s answers 400 naming the parameter, and the tables are intact', async (route) => {
    const planner = await signedIn(t.app, 'planner@example.org');
    for (const name of params[route]) {
      for (const value of attempts) {
        const res = await planner.get(route).query({ [name]: value });
        expect(res.status, `${route}?${name}=${value}`).toBe(400);
        expect(res.body.error.details[0].path).toBe(`query.${name}`);
      }
    }
    const admin = await signedIn(t.app, 'admin@example.org');
    expect((await admin.get('/api/users')).body.length).toBe(23);
  });
});

describe('password policy', () => {
  it('an invitation link refuses a password shorter than 10 characters', async () => {
    t.smtp.clear();
    const admin = await signedIn(t.app, 'admin@example.org');
    await admin.post('/api/users/invitations').send({ email: 'short@example.org', name: 'Short', role: 'treasurer' });
    const [mail] = await t.smtp.waitFor(1);
    const token = mail.text.match(/invite\/([A-Za-z0-9_-]+)/)![1];
    const guest = await agent(t.app);
    const res = await guest.post(`/api/auth/tokens/${token}`).send({ password: 'abc123' });
    expect(res.status).toBe(400);
    expect(res.body.error.details[0]).toEqual({ path: 'body.password', message: 'Use at least 10 characters' });
  });
});

describe('CSRF tokens are bound to the session (issue 15, item 11)', () => {
  const cookieOf = (res: { headers: Record<string, unknown> }, name: string) =>
    ([] as string[]).concat((res.headers['set-cookie'] as string[] | undefined) ?? []).find((c) => c.startsWith(`${name}=`))?.split(';')[0]!.slice(name.length + 1);
  const sidOf = (res: { headers: Record<string, unknown> }) => cookieOf(res, 'netput_sid');

  it('a self-chosen cookie and header pair is refused, signed out and signed in', async () => {
    const chosen = 'a'.repeat(43);
    const anon = await supertest(t.app).post('/api/auth/login').set('Cookie', `XSRF-TOKEN=${chosen}`).set('X-XSRF-TOKEN', chosen).send({ email: 'planner@example.org', password: 'netput-demo' });
    expect(anon.status).toBe(403);
    expect(anon.body.error.code).toBe('csrf');

    const login = await (await agent(t.app)).post('/api/auth/login').send({ email: 'planner@example.org', password: 'netput-demo' });
    const sid = sidOf(login)!;
    const forged = `${'b'.repeat(22)}.${'c'.repeat(43)}`;
    const res = await supertest(t.app).post('/api/models').set('Cookie', `netput_sid=${sid}; XSRF-TOKEN=${forged}`).set('X-XSRF-TOKEN', forged).send({});
    expect(res.status).toBe(403);
    expect(res.body.error.message).toBe('The security token does not belong to this session; reload the page and try again');
  });

  it("another session's token, or the signed-out token after sign-in, does not pass; the token issued at sign-in does", async () => {
    const a = await agent(t.app);
    const before = cookieOf(await supertest(t.app).get('/api/auth/csrf'), 'XSRF-TOKEN');
    const login = await a.post('/api/auth/login').send({ email: 'planner@example.org', password: 'netput-demo' });
    expect(login.status).toBe(200);
    const sid = sidOf(login)!;
    const issued = decodeURIComponent(cookieOf(login, 'XSRF-TOKEN')!);
    const other = decodeURIComponent(cookieOf(await (await agent(t.app)).post('/api/auth/login').send({ email: 'treasurer@example.org', password: 'netput-demo' }), 'XSRF-TOKEN')!);
    const post = (token: string) => supertest(t.app).post('/api/models').set('Cookie', `netput_sid=${sid}; XSRF-TOKEN=${encodeURIComponent(token)}`).set('X-XSRF-TOKEN', token).send({ name: '' });
    expect((await post(other)).status).toBe(403);
    expect((await post(decodeURIComponent(before!))).status).toBe(403);
    // Past the CSRF check: the body's own validation answers.
    expect((await post(issued)).status).toBe(400);
  });

  it('a signed-out token is bound to the pre-session cookie; sign-out hands out a new signed-out token', async () => {
    const a = await agent(t.app);
    expect((await a.post('/api/auth/password-reset').send({ email: 'nobody@example.org' })).status).toBe(202);
    // The same token with another browser's pre-session value does not pass.
    const first = await supertest(t.app).get('/api/auth/csrf');
    const token = decodeURIComponent(cookieOf(first, 'XSRF-TOKEN')!);
    expect(cookieOf(first, 'netput_pre')).toMatch(/^[A-Za-z0-9_-]{43}$/);
    const elsewhere = await supertest(t.app).post('/api/auth/password-reset').set('Cookie', `netput_pre=${'z'.repeat(43)}; XSRF-TOKEN=${encodeURIComponent(token)}`).set('X-XSRF-TOKEN', token).send({ email: 'nobody@example.org' });
    expect(elsewhere.status).toBe(403);

    await a.post('/api/auth/login').send({ email: 'admin@example.org', password: 'netput-demo' });
    const out = await a.post('/api/auth/logout').send({});
    expect(out.status).toBe(204);
    expect(cookieOf(out, 'XSRF-TOKEN')).toBeTruthy();
    // Signed out again, the agent's new token works for the next sign-in.
    expect((await a.post('/api/auth/login').send({ email: 'admin@example.org', password: 'netput-demo' })).status).toBe(200);
  });
});
