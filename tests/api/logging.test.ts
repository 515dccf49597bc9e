/**
 * What the request log may not contain (issue 15, item 11): the CSRF header, cookies, and e-mail
 * addresses in the text of a failed query.
 */
import { describe, expect, it } from 'vitest';
import { agent, startTestApp } from './test-app.js';

function memoryLog() {
  const lines: string[] = [];
  return { lines, destination: { write: (line: string) => void lines.push(line) } };
}

describe('request log', () => {
  it('records requests without the X-XSRF-TOKEN header or any cookie', async () => {
    const log = memoryLog();
    const t = await startTestApp({ logDestination: log.destination });
    try {
      const a = await agent(t.app);
      const login = await a.post('/api/auth/login').send({ email: 'planner@example.org', password: 'netput-demo' });
      expect(login.status).toBe(200);
      const cookies = ([] as string[]).concat(login.headers['set-cookie'] ?? []).map((c) => decodeURIComponent(c.split(';')[0]!.split('=').slice(1).join('=')));
      const xsrf = login.request.getHeader('X-XSRF-TOKEN') as string;
      expect((await a.get('/api/auth/me')).status).toBe(200);
      const all = log.lines.join('\n');
      expect(log.lines.length).toBeGreaterThanOrEqual(2);
      expect(all).toContain('"x-xsrf-token":"[redacted]"');
      expect(all).toContain('"cookie":"[redacted]"');
      expect(xsrf.length).toBeGreaterThan(20);
      expect(all).not.toContain(xsrf);
      for (const value of cookies) expect(all).not.toContain(value);
    } finally {
      await t.close();
    }
  });

  it('a failed query is logged with its e-mail parameters replaced', async () => {
    const log = memoryLog();
    const t = await startTestApp({ logDestination: log.destination });
    try {
      const a = await agent(t.app);
      // The database goes away; the next sign-in's queries (which carry the address) fail.
      await t.database.close();
      const res = await a.post('/api/auth/login').send({ email: 'planner@example.org', password: 'netput-demo' });
      expect(res.status).toBe(500);
      const failed = log.lines.map((l) => JSON.parse(l) as { msg: string; err?: { message: string; stack: string } }).find((l) => l.msg === 'request failed');
      expect(failed?.err?.message).toBeTruthy();
      expect(failed!.err!.message + failed!.err!.stack).toContain('[e-mail]');
      expect(log.lines.join('\n')).not.toContain('planner@example.org');
    } finally {
      t.database.close = async () => undefined;
      await t.close();
    }
  });
});
