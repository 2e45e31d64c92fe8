import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator';

/**
 * The model lifecycle: training runs (with their live progress), promotion
 * requests waiting for a supervisor, daily drift reports, and late-label
 * (chargeback) CSV imports.
 */
export const m0006: Migration = {
  name: '0006-model-lifecycle',
  async up(qi) {
    const now = { type: DataTypes.DATE(3), allowNull: false };
    await qi.createTable('training_runs', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      status: { type: DataTypes.ENUM('queued', 'running', 'completed', 'failed', 'cancelled'), allowNull: false },
      trigger_kind: { type: DataTypes.ENUM('manual', 'schedule'), allowNull: false },
      requested_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      // Window, rounds, label delay, label, notes: parameters only, never data.
      params: { type: DataTypes.TEXT, allowNull: false },
      phase: { type: DataTypes.STRING(80), allowNull: false, defaultValue: '' },
      round: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
      total_rounds: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      train_loss: { type: DataTypes.DOUBLE, allowNull: true },
      validation_loss: { type: DataTypes.DOUBLE, allowNull: true },
      // Loss curve so far, saved as the run goes so a page opened mid-run can draw it.
      curve: { type: DataTypes.TEXT('medium'), allowNull: true },
      model_version_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      error: { type: DataTypes.STRING(500), allowNull: true },
      cancel_requested_at: { type: DataTypes.DATE(3), allowNull: true },
      job_id: { type: DataTypes.STRING(64), allowNull: true },
      created_at: now,
      started_at: { type: DataTypes.DATE(3), allowNull: true },
      finished_at: { type: DataTypes.DATE(3), allowNull: true },
      updated_at: now,
    });
    await qi.addIndex('training_runs', ['created_at']);
    await qi.addIndex('training_runs', ['trigger_kind', 'created_at']);
    await qi.addIndex('training_runs', ['status']);

    await qi.createTable('promotion_requests', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      kind: { type: DataTypes.ENUM('promote', 'rollback'), allowNull: false },
      status: { type: DataTypes.ENUM('pending', 'approved', 'rejected', 'withdrawn'), allowNull: false },
      model_version_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      // The champion when the request was filed: approval is refused if it changed since.
      from_champion_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      reason: { type: DataTypes.TEXT, allowNull: false },
      requested_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      requested_at: now,
      decided_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      decided_at: { type: DataTypes.DATE(3), allowNull: true },
      decision_note: { type: DataTypes.TEXT, allowNull: true },
    });
    await qi.addIndex('promotion_requests', ['status', 'requested_at']);
    await qi.addIndex('promotion_requests', ['model_version_id']);

    await qi.createTable('drift_reports', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      model_version_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      window_from: now,
      window_to: now,
      rows: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      score_psi: { type: DataTypes.DOUBLE, allowNull: false },
      max_psi: { type: DataTypes.DOUBLE, allowNull: false },
      // Per-feature PSI and band, JSON.
      features: { type: DataTypes.TEXT, allowNull: false },
      // Names over the flag limit (score included), JSON array; empty when nothing drifted.
      flagged: { type: DataTypes.TEXT, allowNull: false },
      computed_at: now,
    });
    await qi.addIndex('drift_reports', ['model_version_id', 'window_to']);
    await qi.addIndex('drift_reports', ['computed_at']);

    const count = { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 };
    await qi.createTable('label_imports', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      file_name: { type: DataTypes.STRING(255), allowNull: false },
      status: { type: DataTypes.ENUM('running', 'completed', 'failed'), allowNull: false },
      rows_read: count,
      added: count,
      duplicate: count,
      rejected: count,
      error_code: { type: DataTypes.STRING(40), allowNull: true },
      error_message: { type: DataTypes.STRING(500), allowNull: true },
      // A file name inside UPLOAD_DIR/labels/, never a path.
      error_report_file: { type: DataTypes.STRING(80), allowNull: true },
      started_at: now,
      finished_at: { type: DataTypes.DATE(3), allowNull: true },
    });
    await qi.addIndex('label_imports', ['user_id', 'started_at']);
  },
  async down(qi) {
    for (const t of ['label_imports', 'drift_reports', 'promotion_requests', 'training_runs']) await qi.dropTable(t);
  },
};
