import { register } from 'tsx/esm/api';

register();
const { default: runFrameTask } = await import('./frame-thread.ts');
export default runFrameTask;
