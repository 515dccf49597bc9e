import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { buildSync } from 'esbuild';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
/** Inside the project, so the bundle's package imports resolve from the project's node_modules. */
const CACHE_DIR = path.join(root, 'node_modules', '.cache', 'netput-workers');

const built = new Map<string, string>();

/**
 * A worker thread's entry module compiled to one JavaScript file (the project's own modules
 * bundled, packages left as imports), so the worker runs it with plain Node. Loading the sources
 * through tsx in every worker cost about 100 MB of resident memory per thread and a slower start.
 * The file is named by a hash of its contents and written atomically (temp file, then rename):
 * several processes (two server instances, parallel test files) may build it at once.
 * Returns the file URL to give to piscina.
 */
export function workerBundle(entry: URL): string {
  const source = fileURLToPath(entry);
  const cached = built.get(source);
  if (cached) return cached;
  const result = buildSync({
    entryPoints: [source],
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    packages: 'external',
    sourcemap: 'inline',
    write: false,
    logLevel: 'silent',
  });
  const code = result.outputFiles[0]!.contents;
  const hash = createHash('sha256').update(code).digest('hex').slice(0, 16);
  const file = path.join(CACHE_DIR, `${path.basename(source).replace(/\.[cm]?ts$/, '')}-${hash}.mjs`);
  if (!fs.existsSync(file)) {
    fs.mkdirSync(CACHE_DIR, { recursive: true });
    const tmp = `${file}.${process.pid}.${Date.now()}.tmp`;
    fs.writeFileSync(tmp, code);
    fs.renameSync(tmp, file);
  }
  const url = pathToFileURL(file).href;
  built.set(source, url);
  return url;
}
