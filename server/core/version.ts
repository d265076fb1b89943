import { readFileSync } from 'node:fs';

/** The version from package.json, read once at start. */
export const APP_VERSION: string = JSON.parse(
  readFileSync(new URL('../../package.json', import.meta.url), 'utf8'),
).version;
