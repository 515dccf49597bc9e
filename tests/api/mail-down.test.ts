/**
 * Invitations and reset links while the mail service is down (issue 15, item 6): all or nothing.
 * The SMTP server is really stopped (the mailer gets "connection refused") and started again on
 * the same port.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startFakeSmtp } from '../../server/mail/fake-smtp.js';
import { agent, signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
let admin: Awaited<ReturnType<typeof signedIn>>;
beforeAll(async () => {
  t = await startTestApp();
  admin = await signedIn(t.app, 'admin@example.org');
});
afterAll(async () => t.close());

async function stopSmtp() {
  await t.smtp.close();
}
async function startSmtp() {
  t.smtp = await startFakeSmtp(t.smtp.port);
}
function inviteLink(text: string) {
  return /http:\/\/netput\.test\/invite\/([A-Za-z0-9_-]+)/.exec(text)![1]!;
}
const userByEmail = async (email: string) => ((await admin.get('/api/users')).body as { email: string; id: number; status: string }[]).find((u) => u.email === email);

describe('inviting while the mail service is down', () => {
  it('answers 503 saying nothing was sent and no account was made; the same invitation works once mail is back', async () => {
    await stopSmtp();
    const down = await admin.post('/api/users/invitations').send({ email: 'greta.grain@example.org', name: 'Greta Grain', role: 'planner' });
    expect(down.status).toBe(503);
    expect(down.body.error.code).toBe('mail_unavailable');
    expect(down.body.error.message).toBe(
      'The mail service could not be reached, so the invitation to greta.grain@example.org was not sent and no account was created. Try again in a few minutes.',
    );
    expect(await userByEmail('greta.grain@example.org')).toBeUndefined();
    const audit = await admin.get('/api/audit');
    expect(JSON.stringify(audit.body)).not.toContain('greta.grain@example.org');

    await startSmtp();
    const again = await admin.post('/api/users/invitations').send({ email: 'greta.grain@example.org', name: 'Greta Grain', role: 'planner' });
    expect(again.status).toBe(201);
    const [mail] = await t.smtp.waitFor(1);
    expect(mail!.to).toEqual(['greta.grain@example.org']);
  });
});

describe('resending an invitation', () => {
  it('while mail is down keeps the earlier link working; once sent, only the new link works', async () => {
    t.smtp.clear();
    const created = await admin.post('/api/users/invitations').send({ email: 'hal.harrow@example.org', name: 'Hal Harrow', role: 'treasurer' });
    expect(created.status).toBe(201);
    const first = inviteLink((await t.smtp.waitFor(1))[0]!.text);
    const guest = await agent(t.app);

    await stopSmtp();
    const down = await admin.post(`/api/users/${created.body.id}/invitation`).send({});
    expect(down.status).toBe(503);
    expect(down.body.error.message).toBe(
      'The mail service could not be reached, so the invitation was not sent again. The earlier link to hal.harrow@example.org still works until it expires. Try again in a few minutes.',
    );
    expect((await guest.get(`/api/auth/tokens/${first}`)).status).toBe(200);

    await startSmtp();
    const sent = await admin.post(`/api/users/${created.body.id}/invitation`).send({});
    expect(sent.status).toBe(202);
    expect(sent.body.message).toBe('A new invitation was sent to hal.harrow@example.org; the earlier link no longer works.');
    const second = inviteLink((await t.smtp.waitFor(1))[0]!.text);
    expect(second).not.toBe(first);
    expect((await guest.get(`/api/auth/tokens/${first}`)).status).toBe(410);
    expect((await guest.get(`/api/auth/tokens/${second}`)).body).toMatchObject({ purpose: 'invite', email: 'hal.harrow@example.org' });
  });

  it('is refused for an account that has already accepted', async () => {
    const planner = await userByEmail('planner@example.org');
    const res = await admin.post(`/api/users/${planner!.id}/invitation`).send({});
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/already accepted the invitation/);
  });
});

describe('reset links while the mail service is down', () => {
  it("the admin's reset link answers 503 with the reason; the public form answers as always", async () => {
    const member = await userByEmail('member@example.org');
    await stopSmtp();
    const down = await admin.post(`/api/users/${member!.id}/password-reset`).send({});
    expect(down.status).toBe(503);
    expect(down.body.error.message).toBe(
      'The mail service could not be reached, so no reset link was sent to member@example.org. Links sent earlier still work until they expire. Try again in a few minutes.',
    );
    // The public form answers the same whatever happens, so it reveals no accounts.
    const guest = await agent(t.app);
    const pub = await guest.post('/api/auth/password-reset').send({ email: 'member@example.org' });
    expect(pub.status).toBe(202);
    await startSmtp();
    const sent = await admin.post(`/api/users/${member!.id}/password-reset`).send({});
    expect(sent.status).toBe(202);
    expect(sent.body.message).toBe('A reset link was sent to member@example.org');
  });
});
