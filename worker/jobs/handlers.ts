import { buildPairset } from './build-pairset';
import { compactStorage } from './compact-storage';
import { clusterMomentsJob } from './cluster-moments';
import type { Handlers } from './handler';
import { processClip } from './process-clip';
import { reconcileUsage } from './reconcile-usage';
import { runRetention } from './run-retention';
import { sendRejectionDigestJob } from './send-rejection-digest';

/** Every job kind's handler; typed by the JobKind union, so a kind without a handler does not compile. */
export const HANDLERS: Handlers = {
  'process-clip': processClip,
  'reconcile-usage': reconcileUsage,
  'send-rejection-digest': sendRejectionDigestJob,
  'build-pairset': buildPairset,
  'run-retention': runRetention,
  'compact-storage': compactStorage,
  'cluster-moments': clusterMomentsJob,
};
