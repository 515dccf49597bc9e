import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import type { FolderLock } from './folder-lock.js';

/**
 * Live backups of the embedded database: the server listens on a Unix socket (mode 0600, so only
 * the server's own user can connect) in the data folder's lock folder and answers `POST /snapshot` with
 * a consistent gzipped tarball of its data folder (Database.snapshot). The socket's path is written
 * into the data folder's lock, where `npm run backup` finds it while the server runs: the backup is
 * taken by the one process that has the folder open, instead of by a second process opening it.
 */
export interface BackupSocket {
  path: string;
  close(): Promise<void>;
}

export async function startBackupSocket(lock: FolderLock, snapshot: () => Promise<Blob>, log: (msg: string) => void = () => {}): Promise<BackupSocket> {
  // Beside the lock claims, so it goes when the data folder goes; in a private temporary folder when
  // that path is too long for a Unix socket (about 107 bytes).
  let dir: string | null = null;
  let socketPath = path.join(lock.dir, `backup-${process.pid}.sock`);
  if (Buffer.byteLength(socketPath) < 100) fs.rmSync(socketPath, { force: true });
  else {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'netput-backup-'));
    socketPath = path.join(dir, 'backup.sock');
  }
  const server = http.createServer((req, res) => {
    if (req.method !== 'POST' || req.url !== '/snapshot') {
      res.writeHead(404).end();
      return;
    }
    const started = Date.now();
    snapshot().then(
      async (blob) => {
        const bytes = Buffer.from(await blob.arrayBuffer());
        res.writeHead(200, { 'content-type': 'application/gzip', 'content-length': bytes.length });
        res.end(bytes);
        log(`live backup: ${bytes.length} bytes in ${Date.now() - started} ms`);
      },
      (err: Error) => {
        res.writeHead(500, { 'content-type': 'text/plain' }).end(`The server could not take the backup: ${err.message}`);
      },
    );
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(socketPath, () => resolve());
  });
  fs.chmodSync(socketPath, 0o600);
  lock.update({ backupSocket: socketPath });
  return {
    path: socketPath,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => {
          fs.rmSync(dir ?? socketPath, { recursive: true, force: true });
          resolve();
        });
        server.closeAllConnections();
      }),
  };
}

/** Asks the server listening on `socketPath` for a snapshot and writes it to `file`. */
export function snapshotThroughServer(socketPath: string, file: string): Promise<number> {
  return new Promise((resolve, reject) => {
    const req = http.request({ socketPath, path: '/snapshot', method: 'POST' }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('error', reject);
      res.on('end', () => {
        const body = Buffer.concat(chunks);
        if (res.statusCode !== 200) return reject(new Error(body.toString('utf8') || `the server answered ${res.statusCode}`));
        const tmp = `${file}.partial`;
        fs.writeFileSync(tmp, body);
        fs.renameSync(tmp, file);
        resolve(body.length);
      });
    });
    req.on('error', (err) => reject(new Error(`The running server did not answer on its backup socket (${err.message})`)));
    req.end();
  });
}
