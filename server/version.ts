import fs from 'node:fs';

const pkg = JSON.parse(fs.readFileSync(new URL('../package.json', import.meta.url), 'utf8')) as { version: string };
/** The software version, stored with every model run so results can be reproduced. */
export const VERSION: string = pkg.version;
