import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';
import { flagTriggers } from '../migration-helpers';

/**
 * Review: verdicts with their history, the hourly rejection digests, a key-value settings table (the reject-reasons
 * list lives there), and what makes the review queue fast at 100,000 clips.
 *
 * The queue lists `awaiting_review` clips filtered by flags, project, uploader, site and capture time, sorted by a
 * signal, paged, with a total. So clips get:
 * - clip-level signals the flags stage writes (meanMotion and consistentShare from the motion fields, usablePairs);
 * - `flagMask` (bit i set when the i-th flag below is raised) and `flagCount`, kept from `flags` by triggers so no
 *   writer can let them drift. Bit order is frozen here (a new flag name needs a new migration; the queue tests check
 *   the server's bits against the column). Stored rather than generated columns, because SQLite reads a virtual
 *   column from the table row even when an index holds it, and a flag filter would then read every row;
 * - per sort key a covering index (state, key, id, every filter column): a page is read in index order without
 *   touching the table and stops after pageSize matching entries, whatever the filter;
 * - covering indexes that lead with each equality filter (and one on the flags alone) for the total, which reads
 *   only the entries of the narrowest one. The queue service names these indexes (INDEXED BY).
 * SQLite drops triggers with a table rebuild, so never rebuild `clips` (Sequelize's removeColumn/changeColumn do):
 * use ALTER TABLE … ADD/DROP COLUMN, as 0004 does.
 */
const FLAG_BITS_AT_0006 = ['dark', 'overexposed', 'blurry', 'static', 'short', 'cut-heavy', 'shaky', 'duplicate'];

const SIGNAL_COLUMNS = {
  meanMotion: { type: DataTypes.FLOAT, allowNull: true },
  consistentShare: { type: DataTypes.FLOAT, allowNull: true },
  usablePairs: { type: DataTypes.INTEGER, allowNull: true },
} as const;

const FLAG_COLUMNS = ['flagMask', 'flagCount'];
const flagMaskOf = (position: string, flags: string) =>
  FLAG_BITS_AT_0006.map(
    (flag, bit) => `(CASE WHEN ${position}(${flags}, '"${flag}"') > 0 THEN ${2 ** bit} ELSE 0 END)`,
  ).join(' + ');
const FILTER_COLUMNS = ['projectId', 'uploaderId', 'site', 'capturedAt', 'flagMask'];
const SORT_KEYS = [
  'createdAt',
  'capturedAt',
  'durationS',
  'medianSharpness',
  'meanLuma',
  'meanMotion',
  'consistentShare',
  'cutCount',
  'usablePairs',
  'flagCount',
];
const QUEUE_INDEXES: [name: string, columns: string[]][] = [
  ...SORT_KEYS.map((key): [string, string[]] => [
    `clips_queue_by_${key}`,
    ['state', key, 'id', ...FILTER_COLUMNS.filter((column) => column !== key)],
  ]),
  ['clips_queue_flags', ['state', 'flagMask']],
  ...['projectId', 'uploaderId', 'site'].map((lead): [string, string[]] => [
    `clips_queue_${lead}`,
    ['state', lead, ...FILTER_COLUMNS.filter((column) => column !== lead)],
  ]),
];

export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  const sql = (statement: string) => queryInterface.sequelize.query(statement, { transaction });
  await queryInterface.createTable(
    'rejection_digests',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      uploaderId: {
        type: DataTypes.INTEGER,
        allowNull: false,
        references: { model: 'users', key: 'id' },
        onDelete: 'CASCADE',
      },
      at: { type: DataTypes.DATE, allowNull: false },
      clipCount: { type: DataTypes.INTEGER, allowNull: false },
    },
    { transaction },
  );
  await queryInterface.addIndex('rejection_digests', ['uploaderId', 'at'], { transaction });

  await queryInterface.createTable(
    'verdicts',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      clipId: {
        type: DataTypes.INTEGER,
        allowNull: false,
        references: { model: 'clips', key: 'id' },
        onDelete: 'CASCADE',
      },
      curatorId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' } },
      decision: { type: DataTypes.STRING(8), allowNull: false },
      reason: { type: DataTypes.STRING(40), allowNull: true },
      reasonLabel: { type: DataTypes.STRING(80), allowNull: true },
      comment: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      bulk: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      at: { type: DataTypes.DATE, allowNull: false },
      supersededAt: { type: DataTypes.DATE, allowNull: true },
      // The rejection digest that told the uploader; null until one did (or for an acceptance).
      digestId: {
        type: DataTypes.INTEGER,
        allowNull: true,
        references: { model: 'rejection_digests', key: 'id' },
        onDelete: 'SET NULL',
      },
    },
    { transaction },
  );
  await queryInterface.addIndex('verdicts', ['clipId', 'at'], { transaction });
  // At most one verdict in force per clip: a change supersedes the old one in the same transaction.
  await sql('CREATE UNIQUE INDEX verdicts_in_force ON verdicts ("clipId") WHERE "supersededAt" IS NULL');
  // Rejections in force that no digest has told the uploader about yet: what the next digest lists.
  await sql(`CREATE INDEX verdicts_undigested ON verdicts ("clipId")
    WHERE decision = 'reject' AND "supersededAt" IS NULL AND "digestId" IS NULL`);

  await queryInterface.createTable(
    'settings',
    {
      key: { type: DataTypes.STRING(64), primaryKey: true },
      value: { type: DataTypes.JSON, allowNull: false },
      updatedById: {
        type: DataTypes.INTEGER,
        allowNull: true,
        references: { model: 'users', key: 'id' },
        onDelete: 'SET NULL',
      },
      updatedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );

  for (const [column, definition] of Object.entries(SIGNAL_COLUMNS)) {
    await queryInterface.addColumn('clips', column, definition, { transaction });
  }
  for (const column of FLAG_COLUMNS) await sql(`ALTER TABLE clips ADD COLUMN "${column}" INTEGER NOT NULL DEFAULT 0`);
  const triggers = flagTriggers(queryInterface.sequelize, flagMaskOf);
  await sql(`UPDATE clips SET ${triggers.assignments('')}`);
  for (const statement of triggers.create) await sql(statement);
  for (const [name, columns] of QUEUE_INDEXES) {
    await sql(`CREATE INDEX ${name} ON clips (${columns.map((column) => `"${column}"`).join(', ')})`);
  }
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  const sql = (statement: string) => queryInterface.sequelize.query(statement, { transaction });
  for (const [name] of [...QUEUE_INDEXES].reverse()) await sql(`DROP INDEX ${name}`);
  for (const statement of flagTriggers(queryInterface.sequelize, flagMaskOf).drop) await sql(statement);
  // SQLite's own DROP COLUMN: a rebuild of clips would cascade into every table that references it.
  for (const column of [...FLAG_COLUMNS, ...Object.keys(SIGNAL_COLUMNS)].reverse()) {
    await sql(`ALTER TABLE clips DROP COLUMN "${column}"`);
  }
  await queryInterface.dropTable('settings', { transaction });
  await queryInterface.dropTable('verdicts', { transaction });
  await queryInterface.dropTable('rejection_digests', { transaction });
}
