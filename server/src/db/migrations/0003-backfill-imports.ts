import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator';

/** CSV back-fill runs: who uploaded what, how far it got and where its error report is. */
export const m0003: Migration = {
  name: '0003-backfill-imports',
  async up(qi) {
    const count = { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 };
    await qi.createTable('backfill_imports', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      file_name: { type: DataTypes.STRING(255), allowNull: false },
      // 'interrupted' is never stored: a running row that stopped reporting is shown as such.
      status: { type: DataTypes.ENUM('running', 'completed', 'failed'), allowNull: false },
      rows_read: count,
      accepted: count,
      duplicate: count,
      rejected: count,
      labels_added: count,
      bytes_read: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false, defaultValue: 0 },
      error_code: { type: DataTypes.STRING(40), allowNull: true },
      error_message: { type: DataTypes.STRING(500), allowNull: true },
      // A file name inside UPLOAD_DIR/backfill/, never a path: the folder comes from configuration at read time.
      error_report_file: { type: DataTypes.STRING(80), allowNull: true },
      started_at: { type: DataTypes.DATE(3), allowNull: false },
      finished_at: { type: DataTypes.DATE(3), allowNull: true },
      updated_at: { type: DataTypes.DATE(3), allowNull: false },
    });
    await qi.addIndex('backfill_imports', ['user_id', 'started_at']);
    await qi.addIndex('backfill_imports', ['started_at']);
  },
  async down(qi) {
    await qi.dropTable('backfill_imports');
  },
};
