// Browser tests drive Debian's Chromium. Installs it when missing and running as root; otherwise says how.
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';

const CHROMIUM = '/usr/bin/chromium';
const INSTALL = 'apt-get update && apt-get install -y chromium';

if (!fs.existsSync(CHROMIUM)) {
  if (process.getuid?.() !== 0) {
    console.error(`Browser tests need Debian's Chromium at ${CHROMIUM}. Install it with:\n  sudo sh -c '${INSTALL}'`);
    process.exit(1);
  }
  console.log(`Installing Debian's Chromium for the browser tests (${INSTALL}) ...`);
  execFileSync('sh', ['-c', `${INSTALL} >/dev/null`], { stdio: 'inherit' });
}
