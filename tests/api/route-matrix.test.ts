import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROLES, type Role } from '../../shared/roles.js';
import { agent, signedIn, startTestApp, type TestApp } from './test-app.js';

/**
 * Walks every API route in the app's own route table, for an anonymous caller and each role, and
 * checks the answer its access rule gives: 401 without a session, 403 for a role the route does not
 * admit, and neither for a role it admits. A route added without a rule cannot be mounted at all.
 */
let t: TestApp;
const agents: Partial<Record<Role | 'anonymous', Awaited<ReturnType<typeof agent>>>> = {};
const EMAIL: Record<Role, string> = {
  admin: 'admin@example.org',
  planner: 'planner@example.org',
  treasurer: 'treasurer@example.org',
  member: 'member@example.org',
};

beforeAll(async () => {
  t = await startTestApp();
  agents.anonymous = await agent(t.app);
  for (const role of ROLES) agents[role] = await signedIn(t.app, EMAIL[role]);
});
afterAll(async () => t.close());

function concrete(path: string) {
  return path.replace(/:token/g, 'A'.repeat(43)).replace(/:[a-zA-Z]+/g, '1');
}

// Routes that end the caller's own session go last.
const LAST = new Set(['/api/auth/logout']);

describe('role × route matrix', () => {
  it('the table holds every mounted route, each with an access rule', () => {
    expect(t.app.routeTable.length).toBeGreaterThan(30);
    for (const r of t.app.routeTable) expect(r.access === 'public' || r.access === 'signed-in' || Array.isArray(r.access)).toBe(true);
  });

  it('every route answers each caller as its rule says', async () => {
    const routes = [...t.app.routeTable].sort((a, b) => Number(LAST.has(a.fullPath)) - Number(LAST.has(b.fullPath)));
    const failures: string[] = [];
    for (const route of routes) {
      for (const who of ['anonymous', ...ROLES] as const) {
        const a = agents[who]!;
        const url = concrete(route.fullPath);
        const res = await a[route.method](url).send({});
        const expected =
          route.access === 'public'
            ? 'allowed'
            : who === 'anonymous'
              ? 401
              : route.access === 'signed-in' || route.access.includes(who)
                ? 'allowed'
                : 403;
        const ok = expected === 'allowed' ? res.status !== 401 && res.status !== 403 && res.status < 500 : res.status === expected;
        if (!ok) failures.push(`${route.method.toUpperCase()} ${route.fullPath} as ${who}: ${res.status} (expected ${expected}) ${JSON.stringify(res.body).slice(0, 120)}`);
      }
    }
    expect(failures).toEqual([]);
  }, 180_000);
});
