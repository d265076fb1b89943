// What `npm test` needs beyond npm packages: Debian's Chromium for the browser tests and the Middlebury Grove3
// frame with its ground-truth field for the motion accuracy tests. Installs what is missing when running as root
// (so a newcomer's first run skips nothing); otherwise says which command to run.
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const CHROMIUM = '/usr/bin/chromium';
const INSTALL_CHROMIUM = 'apt-get update && apt-get install -y chromium';
const GROVE3 = path.join(ROOT, '.cache', 'grove3', 'grove3.flo');
const FETCH_GROVE3 = `bash ${path.join('tests', 'fixtures', 'fetch-grove3.sh')}`;
const isRoot = process.getuid?.() === 0;

function run(command) {
  execFileSync('sh', ['-c', command], { stdio: 'inherit', cwd: ROOT });
}

if (!fs.existsSync(CHROMIUM)) {
  if (!isRoot) {
    console.error(
      `Browser tests need Debian's Chromium at ${CHROMIUM}. Install it with:\n  sudo sh -c '${INSTALL_CHROMIUM}'`,
    );
    process.exit(1);
  }
  console.log(`Installing Debian's Chromium for the browser tests (${INSTALL_CHROMIUM}) ...`);
  run(`${INSTALL_CHROMIUM} >/dev/null`);
}

// The clustering tests compare with scikit-learn through Debian's own python3.
const SKLEARN_CHECK = "/usr/bin/python3 -c 'import sklearn, numpy'";
const INSTALL_SKLEARN = 'apt-get install -y python3-sklearn python3-numpy';
try {
  execFileSync('sh', ['-c', SKLEARN_CHECK], { stdio: 'ignore' });
} catch {
  if (!isRoot) {
    console.error(
      `The clustering tests need Debian's scikit-learn. Install it with:\n  sudo sh -c '${INSTALL_SKLEARN}'`,
    );
    process.exit(1);
  }
  console.log(`Installing Debian's scikit-learn for the clustering tests (${INSTALL_SKLEARN}) ...`);
  run(`apt-get update >/dev/null && ${INSTALL_SKLEARN} >/dev/null`);
}

if (!fs.existsSync(GROVE3)) {
  console.log('Fetching the Middlebury Grove3 frame and ground truth for the motion accuracy tests ...');
  try {
    // fetch-grove3.sh uses apt-get download, which needs package lists: refresh them first when we may.
    if (isRoot) run('apt-get update >/dev/null');
    run(FETCH_GROVE3);
  } catch {
    console.error(
      `Could not fetch Grove3; the motion accuracy suite needs it. Run: ${isRoot ? '' : 'sudo '}apt-get update && ${FETCH_GROVE3}`,
    );
    process.exit(1);
  }
}
