import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig, publicUrlWarning } from '../../server/config.js';
import { signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
}, 180_000);
afterAll(async () => t?.close());

describe('the public address of e-mail links (issue 16)', () => {
  it('without PUBLIC_URL the links point to localhost and a warning says so; with it, none', () => {
    const unset = loadConfig({ PORT: '3000' }, []);
    expect(unset.publicUrl).toBe('http://localhost:3000');
    expect(unset.publicUrlSet).toBe(false);
    expect(publicUrlWarning(unset)).toMatch(/^PUBLIC_URL is not set, so links in e-mails .* point to http:\/\/localhost:3000, which only works on this computer/);
    const set = loadConfig({ PORT: '3000', PUBLIC_URL: 'https://netput.example.org/' }, []);
    expect(set.publicUrl).toBe('https://netput.example.org');
    expect(publicUrlWarning(set)).toBeNull();
  });

  it('the admin reads the address in use and how mail leaves; other roles may not', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    const res = await admin.get('/api/settings/server');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ publicUrl: 'http://netput.test', publicUrlSet: true, publicUrlWarning: null, mail: 'local' });
    expect((await (await signedIn(t.app, 'planner@example.org')).get('/api/settings/server')).status).toBe(403);
  }, 60_000);
});
