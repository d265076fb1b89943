import type { QueryInterface, Transaction } from 'sequelize';

/**
 * The clip list's default order (newest first, then id) over every clip: without it, each page of GET /api/clips
 * sorted the whole table (100,000 clips: a temporary B-tree per request).
 */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.addIndex('clips', ['createdAt', 'id'], { name: 'clips_created_at_id', transaction });
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.removeIndex('clips', 'clips_created_at_id', { transaction });
}
