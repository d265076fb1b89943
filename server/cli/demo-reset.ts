/**
 * `npm run demo:reset`: removes the database and every stored file under KINEFOLD_STORAGE_DIR, so the next
 * `npm start` creates the demo campaign afresh. Stop Kinefold first.
 */
import fs from 'node:fs';
import path from 'node:path';
import { loadConfig } from '../config';

const config = loadConfig();
const KINEFOLD_FOLDERS = ['db', 'incoming', 'clips', 'pairsets'];
for (const folder of KINEFOLD_FOLDERS) {
  fs.rmSync(path.join(config.storageDir, folder), { recursive: true, force: true });
}
console.log(`demo:reset: emptied ${config.storageDir} (${KINEFOLD_FOLDERS.join(', ')}). Run npm start to begin again.`);
