import type { Config } from '../core/config';
import { curateDemoCampaign } from './curation';
import { demoSeeded, seedDemoCampaign } from './seed';

/**
 * The demo campaign on a start with KINEFOLD_DEMO=full: footage in (unless all of it is there), then the curator's
 * verdicts and the engineer's pairset once the worker has processed the clips. Each part skips what is done, so
 * a start interrupted anywhere finishes on the next. Stops waiting when `signal` aborts (the server is closing).
 */
export async function runDemoCampaign(config: Config, signal: AbortSignal): Promise<void> {
  if (!(await demoSeeded())) await seedDemoCampaign(config);
  if (!signal.aborted) await curateDemoCampaign(config, signal);
}
