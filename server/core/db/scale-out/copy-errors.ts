/** The copy will not start (or go on): the message says why, what to do, and whether anything was changed. */
export class CopyRefused extends Error {}

/** A table that could not be copied: which rows and why. Nothing of the table was kept. */
export class TableCopyFailed extends Error {}
