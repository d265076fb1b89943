/**
 * The rules of reviewing (issue "Review queue"), in one place so the server enforces and the screens explain the
 * same figures.
 */

/** A claim lasts this long unless renewed; after that it is gone by itself, with nothing to clean up. */
export const CLAIM_MINUTES = 15;

/** A curator may change a verdict they gave for this long after the clip was first decided; an admin any time. */
export const VERDICT_CHANGE_HOURS = 24;

/** An uploader gets at most one rejection digest per this many minutes. */
export const DIGEST_INTERVAL_MINUTES = 60;

/**
 * Most clips one bulk action decides. Every clip gets its verdict and audit event in one transaction, and the
 * worker shares the database, so a bigger batch would hold the write lock for too long; narrow the filter instead.
 */
export const MAX_BULK_CLIPS = 1000;

export const VERDICT_DECISIONS = ['accept', 'reject'] as const;
export type VerdictDecision = (typeof VERDICT_DECISIONS)[number];

/**
 * A verdict can be undone (the clip goes back to the queue) for this long after it was given, by whoever gave it;
 * the review screen offers it for UNDO_OFFER_SECONDS, and the rest is slack for a slow network.
 */
export const UNDO_SECONDS = 30;
export const UNDO_OFFER_SECONDS = 8;
