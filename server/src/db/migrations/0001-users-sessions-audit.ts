import { DataTypes, QueryTypes } from 'sequelize';
import type { Migration } from '../migrator';

export const m0001: Migration = {
  name: '0001-users-sessions-audit',
  async up(qi, sequelize) {
    await qi.createTable('users', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
      display_name: { type: DataTypes.STRING(120), allowNull: false },
      role: { type: DataTypes.ENUM('investigator', 'supervisor', 'data_scientist', 'admin'), allowNull: false },
      status: { type: DataTypes.ENUM('active', 'invited', 'deactivated'), allowNull: false, defaultValue: 'active' },
      password_hash: { type: DataTypes.STRING(255), allowNull: true },
      failed_login_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
      locked_until: { type: DataTypes.DATE(3), allowNull: true },
      last_login_at: { type: DataTypes.DATE(3), allowNull: true },
      created_at: { type: DataTypes.DATE(3), allowNull: false },
      updated_at: { type: DataTypes.DATE(3), allowNull: false },
    });

    // express-session rows (connect-session-sequelize); user_id lets us end every session of a person at once.
    await qi.createTable('sessions', {
      sid: { type: DataTypes.STRING(64), primaryKey: true },
      expires: { type: DataTypes.DATE(3), allowNull: true },
      data: { type: DataTypes.TEXT, allowNull: true },
      user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      created_at: { type: DataTypes.DATE(3), allowNull: false },
      updated_at: { type: DataTypes.DATE(3), allowNull: false },
    });
    await qi.addIndex('sessions', ['expires']);
    await qi.addIndex('sessions', ['user_id']);

    // Append-only audit log; each row carries the hash of the previous one so an edit shows.
    await qi.createTable('audit_log', {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
      occurred_at: { type: DataTypes.DATE(3), allowNull: false },
      actor_type: { type: DataTypes.ENUM('user', 'api_key', 'system', 'anonymous'), allowNull: false },
      actor_id: { type: DataTypes.STRING(64), allowNull: true },
      actor_label: { type: DataTypes.STRING(254), allowNull: true },
      action: { type: DataTypes.STRING(64), allowNull: false },
      target_type: { type: DataTypes.STRING(32), allowNull: true },
      target_id: { type: DataTypes.STRING(64), allowNull: true },
      outcome: { type: DataTypes.ENUM('success', 'failure', 'denied'), allowNull: false },
      ip: { type: DataTypes.STRING(45), allowNull: true },
      user_agent: { type: DataTypes.STRING(255), allowNull: true },
      details: { type: DataTypes.TEXT, allowNull: true },
      prev_hash: { type: DataTypes.CHAR(64), allowNull: false },
      hash: { type: DataTypes.CHAR(64), allowNull: false },
    });
    await qi.addIndex('audit_log', ['occurred_at']);
    await qi.addIndex('audit_log', ['actor_type', 'actor_id', 'occurred_at']);
    await qi.addIndex('audit_log', ['action', 'occurred_at']);
    await qi.addIndex('audit_log', ['target_type', 'target_id']);

    // A single row that serialises appends to the hash chain (SELECT ... FOR UPDATE).
    await qi.createTable('audit_chain_head', {
      id: { type: DataTypes.TINYINT.UNSIGNED, primaryKey: true },
      last_id: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false, defaultValue: 0 },
      last_hash: { type: DataTypes.CHAR(64), allowNull: false },
    });
    await sequelize.query("INSERT INTO audit_chain_head (id, last_id, last_hash) VALUES (1, 0, REPEAT('0', 64))", {
      type: QueryTypes.INSERT,
    });

    // The database itself refuses edits and deletions of audit rows.
    await sequelize.query(
      "CREATE TRIGGER audit_log_no_update BEFORE UPDATE ON audit_log FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'audit_log is append-only'",
      { type: QueryTypes.RAW },
    );
    await sequelize.query(
      "CREATE TRIGGER audit_log_no_delete BEFORE DELETE ON audit_log FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'audit_log is append-only'",
      { type: QueryTypes.RAW },
    );
  },
  async down(qi, sequelize) {
    await sequelize.query('DROP TRIGGER IF EXISTS audit_log_no_update', { type: QueryTypes.RAW });
    await sequelize.query('DROP TRIGGER IF EXISTS audit_log_no_delete', { type: QueryTypes.RAW });
    await qi.dropTable('audit_chain_head');
    await qi.dropTable('audit_log');
    await qi.dropTable('sessions');
    await qi.dropTable('users');
  },
};
