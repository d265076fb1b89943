/**
 * What each thread of the motion benchmark's pool loads: tsx's loader, then the TypeScript task, the same way
 * worker/pool/frame-thread-entry.mjs starts the product's pool threads.
 */
import { register } from 'tsx/esm/api';

register();
const { default: estimatePair } = await import('./motion-thread.ts');

export default estimatePair;
