#!/usr/bin/env node
/**
 * Runs one of the engine's command-line entries (`npm run fit`, `npm run project`) as bundled
 * JavaScript instead of compiling TypeScript at every start.
 *
 *   node scripts/cli.mjs fit --input FILE.csv ...
 *
 * The entry, the project modules and the packages it imports are bundled by esbuild into one file,
 * node_modules/.cache/netput-cli/<name>.mjs (one file to read and compile instead of a tree of
 * CommonJS packages to resolve and scan). The bundle is rebuilt
 * when it is missing or stale, that is when any file it was built from (esbuild's metafile lists
 * them), this script or package-lock.json has changed since the build. The bundle and its list
 * are written to a temporary file and then renamed, so parallel runs can build at the same time. Nothing built is committed.
 * A fresh clone builds on its first run, which costs a few hundred milliseconds once.
 */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
/** Command name → entry module (the hook for a new command is one line here and one in package.json). */
const ENTRIES = {
  fit: 'server/estimation/cli.ts',
  project: 'server/estimation/project-cli.ts',
};
const CACHE_DIR = path.join(root, 'node_modules', '.cache', 'netput-cli');
/** Raised when the way bundles are built changes, so that older bundles are rebuilt. */
const BUILD_FORMAT = 2;

const name = process.argv[2];
const entryRel = ENTRIES[name];
if (!entryRel) {
  process.stderr.write(`cli: unknown command "${name ?? ''}" (commands: ${Object.keys(ENTRIES).join(', ')})\n`);
  process.exit(2);
}
const entry = path.join(root, entryRel);
const out = path.join(CACHE_DIR, `${name}.mjs`);
const metaFile = path.join(CACHE_DIR, `${name}.inputs.json`);

/** True when the bundle exists and no input changed after it was built. */
function fresh() {
  let meta;
  try {
    meta = JSON.parse(fs.readFileSync(metaFile, 'utf8'));
    if (meta.format !== BUILD_FORMAT || meta.entry !== entryRel || !fs.existsSync(out)) return false;
  } catch {
    return false;
  }
  for (const input of meta.inputs) {
    let st;
    try {
      st = fs.statSync(path.join(root, input));
    } catch {
      return false;
    }
    if (st.mtimeMs > meta.builtAt) return false;
  }
  return true;
}

async function build() {
  const { buildSync } = await import('esbuild');
  const builtAt = Date.now();
  const result = buildSync({
    entryPoints: [entry],
    absWorkingDir: root,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    metafile: true,
    write: false,
    logLevel: 'silent',
  });
  // This script (the build options) and the lock file (package versions) count as inputs too.
  const inputs = [...Object.keys(result.metafile.inputs), 'scripts/cli.mjs', 'package-lock.json'];
  fs.mkdirSync(CACHE_DIR, { recursive: true });
  const tag = `${process.pid}.${Date.now()}.tmp`;
  fs.writeFileSync(`${out}.${tag}`, result.outputFiles[0].contents);
  fs.renameSync(`${out}.${tag}`, out);
  fs.writeFileSync(`${metaFile}.${tag}`, JSON.stringify({ format: BUILD_FORMAT, entry: entryRel, builtAt, inputs }));
  fs.renameSync(`${metaFile}.${tag}`, metaFile);
}

if (!fresh()) await build();
// The entry decides whether it was started as a program from argv[1]: give it its own path, and
// its arguments after it, as `tsx <entry> ...` would.
process.argv = [process.argv[0], entry, ...process.argv.slice(3)];
await import(pathToFileURL(out).href);
