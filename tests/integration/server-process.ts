import { spawn, type ChildProcess } from 'node:child_process';
import net from 'node:net';

export interface ServerProcess {
  url: string;
  port: number;
  child: ChildProcess;
  output: () => string;
  stop(signal?: NodeJS.Signals): Promise<void>;
}

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
    s.on('error', reject);
  });
}

/** Starts `tsx server/main.ts` as a child process and waits until /api/health answers. */
export async function startServerProcess(env: Record<string, string>, timeoutMs = 120_000): Promise<ServerProcess> {
  const port = await freePort();
  let out = '';
  const child = spawn('node_modules/.bin/tsx', ['server/main.ts'], {
    env: { ...process.env, LOG_LEVEL: 'warn', PORT: String(port), APP_DIR: '/nonexistent', NETPUT_DEMO_PREPARE: '0', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
    // tsx runs the server in a child node process: a process group of their own lets a signal
    // (SIGKILL above all) reach the server itself and not only the tsx wrapper.
    detached: true,
  });
  child.stdout!.on('data', (d) => (out += d));
  child.stderr!.on('data', (d) => (out += d));
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited with ${child.exitCode}: ${out}`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) break;
    } catch {
      /* not up yet */
    }
    if (Date.now() > deadline) {
      process.kill(-child.pid!, 'SIGKILL');
      throw new Error(`server did not start in time: ${out}`);
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  return {
    url,
    port,
    child,
    output: () => out,
    stop: async (signal = 'SIGTERM') => {
      const pgid = child.pid!;
      const alive = () => {
        try {
          process.kill(-pgid, 0);
          return true;
        } catch {
          return false;
        }
      };
      if (!alive()) return;
      process.kill(-pgid, signal);
      const end = Date.now() + 30_000;
      while (alive()) {
        if (Date.now() > end) process.kill(-pgid, 'SIGKILL');
        await new Promise((r) => setTimeout(r, 50));
      }
    },
  };
}

/** A tiny cookie-keeping client that speaks the XSRF convention, for tests against a real process. */
export class HttpSession {
  private cookies = new Map<string, string>();
  constructor(public base: string) {}

  private remember(res: Response) {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';');
      const i = pair.indexOf('=');
      this.cookies.set(pair.slice(0, i), pair.slice(i + 1));
    }
  }

  cookieHeader() {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  }

  /** A multipart upload: text fields and one file in the form field "file". */
  async upload(path: string, fields: Record<string, string>, file: { name: string; bytes: Uint8Array; type?: string }) {
    if (!this.cookies.has('XSRF-TOKEN')) this.remember(await fetch(`${this.base}/api/auth/csrf`, { headers: { cookie: this.cookieHeader() } }));
    const form = new FormData();
    for (const [k, v] of Object.entries(fields)) form.append(k, v);
    form.append('file', new Blob([file.bytes as Uint8Array<ArrayBuffer>], { type: file.type ?? 'text/csv' }), file.name);
    const res = await fetch(`${this.base}${path}`, {
      method: 'POST',
      headers: { cookie: this.cookieHeader(), 'x-xsrf-token': decodeURIComponent(this.cookies.get('XSRF-TOKEN') ?? '') },
      body: form,
    });
    this.remember(res);
    const text = await res.text();
    return { status: res.status, body: (text ? JSON.parse(text) : null) as any }; // eslint-disable-line @typescript-eslint/no-explicit-any
  }

  /** Shares this session's cookies with another instance's base URL. */
  at(base: string) {
    const s = new HttpSession(base);
    s.cookies = new Map(this.cookies);
    return s;
  }

  async request(method: string, path: string, body?: unknown) {
    if (!this.cookies.has('XSRF-TOKEN')) this.remember(await fetch(`${this.base}/api/auth/csrf`, { headers: { cookie: this.cookieHeader() } }));
    const res = await fetch(`${this.base}${path}`, {
      method,
      headers: {
        cookie: this.cookieHeader(),
        'content-type': 'application/json',
        'x-xsrf-token': decodeURIComponent(this.cookies.get('XSRF-TOKEN') ?? ''),
      },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    this.remember(res);
    const text = await res.text();
    let json: unknown = null;
    try {
      json = text ? JSON.parse(text) : null;
    } catch {
      json = text;
    }
    return { status: res.status, body: json as any }; // eslint-disable-line @typescript-eslint/no-explicit-any
  }
}
