import type { AuditEntry } from '../../../shared/types/admin';

/** What each recorded action did, as a verb phrase that reads after the actor's name. */
const ACTION_WORDS: Record<string, string> = {
  'clip.upload': 'uploaded',
  'clip.edit': 'edited the capture metadata of',
  'clip.processed': 'finished processing',
  'clip.reprocess': 'queued for processing again',
  'clip.purge': 'purged the footage of',
  'clip.verdict': 'gave a verdict on',
  'review.bulk': 'gave verdicts in bulk on',
  'pairset.build': 'started building',
  'pairset.cancel': 'cancelled the build of',
  'pairset.delete': 'deleted',
  'project.create': 'created',
  'project.update': 'changed the settings of',
  'user.create': 'added',
  'user.update': 'changed the account of',
  'invitation.create': 'invited someone with',
  'invitation.resend': 'sent again',
  'invitation.revoke': 'revoked',
  'invitation.accept': 'accepted',
  'password.reset': 'set a new password through',
  'password.change': 'changed the password of',
  'token.create': 'created',
  'token.revoke': 'revoked',
  'settings.update': 'changed',
  'job.cancel': 'cancelled',
  'job.retry': 'retried',
  'retention.request': 'asked for a retention run on',
  'usage.reconcile': 'reconciled storage of',
  'usage.reconcile-request': 'asked to reconcile storage of',
};

/** Names for detail keys that do not read well as they are. */
const DETAIL_WORDS: Record<string, string> = {
  originalName: 'file',
  sizeBytes: 'size',
  storedBytes: 'stored',
  projectId: 'project',
  clipId: 'clip',
  reasonCode: 'reason',
  frameCount: 'frames',
  cutCount: 'cuts',
};

function targetWords(entry: AuditEntry): string {
  const kind = entry.targetType.replace(/[-_]/g, ' ');
  if (entry.targetType === 'settings') return 'the settings';
  return entry.targetId ? `${kind} ${entry.targetId}` : `the ${kind}`;
}

function valueWords(value: unknown): string {
  if (value === null || value === undefined || value === '') return '—';
  if (Array.isArray(value)) return value.length === 0 ? 'none' : value.map(valueWords).join(', ');
  if (typeof value === 'object') return `${Object.keys(value).length} fields`;
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  return String(value);
}

/** Splits camelCase and kebab keys into words: `retentionDays` → "retention days". */
function keyWords(key: string): string {
  return (
    DETAIL_WORDS[key] ??
    key
      .replace(/([a-z0-9])([A-Z])/g, '$1 $2')
      .replace(/[-_]/g, ' ')
      .toLowerCase()
  );
}

/** One entry as a sentence, e.g. "Ada Field uploaded clip 12 (file: pass.mp4; size: 1048576)." */
export function auditSentence(entry: AuditEntry): string {
  const who = entry.actorName ?? 'Kinefold';
  const verb = ACTION_WORDS[entry.action] ?? `did "${entry.action}" to`;
  const details = Object.entries(entry.detail ?? {})
    .map(([key, value]) => `${keyWords(key)}: ${valueWords(value)}`)
    .join('; ');
  return `${who} ${verb} ${targetWords(entry)}${details ? ` (${details})` : ''}.`;
}
