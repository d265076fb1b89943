import type { Handlers } from './handler';
import { processClip } from './process-clip';

/** Every job kind's handler; typed by the JobKind union, so a kind without a handler does not compile. */
export const HANDLERS: Handlers = {
  'process-clip': processClip,
};
