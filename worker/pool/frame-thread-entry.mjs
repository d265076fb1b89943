/**
 * What each thread of the frame pool loads. It registers tsx's loader inside the thread itself and only then
 * imports the TypeScript entry, so loading never depends on how the parent process was started: `node --import
 * tsx worker/index.ts` in production and vitest in tests take the same path. (A `.ts` entry with the parent's
 * `--import tsx` passed on in execArgv loads too, but now and then a thread started before the loader was in place
 * and failed with "Unknown file extension .ts".)
 */
import { register } from 'tsx/esm/api';

register();
const { default: runFrameTask } = await import('./frame-thread.ts');

export default runFrameTask;
