/** A farm with several member accounts (a family farm): each sees the same farm and only it (issue 16). */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { agent, signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => t.close());

describe('several members on one farm', () => {
  it('a second account linked to a farm sees the same farm, records and portal scope as the first', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    const first = await signedIn(t.app, 'member@example.org');
    const farmId = (await first.get('/api/auth/me')).body.farmId as number;
    expect(farmId).toBeGreaterThan(0);

    const invited = await admin.post('/api/users/invitations').send({ email: 'second.member@example.org', name: 'Sam Second', role: 'member', farmId });
    expect(invited.status).toBe(201);
    expect(invited.body).toMatchObject({ farmId, status: 'invited' });
    const [mail] = await t.smtp.waitFor(1);
    const token = /\/invite\/([A-Za-z0-9_-]+)/.exec(mail!.text)![1]!;
    const accepted = await (await agent(t.app)).post(`/api/auth/tokens/${token}`).send({ password: 'a-family-farm-password' });
    expect(accepted.status).toBe(200);
    const second = await signedIn(t.app, 'second.member@example.org', 'a-family-farm-password');

    // The first member keeps the farm: linking a second does not take it away.
    expect((await first.get('/api/auth/me')).body.farmId).toBe(farmId);
    const a = await first.get('/api/my-farm');
    const b = await second.get('/api/my-farm');
    expect(b.status).toBe(200);
    expect(b.body.farm.id).toBe(farmId);
    expect(b.body.records).toEqual(a.body.records);
    const recordsA = await first.get('/api/records');
    const recordsB = await second.get('/api/records');
    expect(recordsB.body).toEqual(recordsA.body);
    expect(new Set((recordsB.body as { farmId: number }[]).map((r) => r.farmId))).toEqual(new Set([farmId]));

    // The farm lists both accounts.
    const farms = (await admin.get('/api/farms')).body as { id: number; members: { name: string }[] }[];
    expect(farms.find((f) => f.id === farmId)!.members.map((m) => m.name).sort()).toEqual(['Sam Second', a.body.farm.members.find((m: { name: string }) => m.name !== 'Sam Second').name].sort());
    expect(b.body.farm.members).toHaveLength(2);
  });
});
