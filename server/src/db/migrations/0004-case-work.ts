import { DataTypes, QueryTypes } from 'sequelize';
import type { Migration } from '../migrator';

/** Case work: cardholder contacts, notes, evidence, messages, outgoing events, per-user preferences. */
export const m0004: Migration = {
  name: '0004-case-work',
  async up(qi, sequelize) {
    const now = { type: DataTypes.DATE(3), allowNull: false };
    await qi.createTable('cardholders', {
      ref: { type: DataTypes.STRING(64), primaryKey: true },
      display_name: { type: DataTypes.STRING(120), allowNull: true },
      email: { type: DataTypes.STRING(254), allowNull: true },
      phone: { type: DataTypes.STRING(40), allowNull: true },
      created_at: now,
      updated_at: now,
    });
    await qi.createTable('case_notes', {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
      case_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      author_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      text: { type: DataTypes.TEXT, allowNull: false },
      created_at: now,
    });
    await qi.addIndex('case_notes', ['case_id', 'created_at']);
    await qi.createTable('case_evidence', {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
      case_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      uploaded_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      file_name: { type: DataTypes.STRING(200), allowNull: false },
      content_type: { type: DataTypes.STRING(80), allowNull: false },
      size: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      sha256: { type: DataTypes.CHAR(64), allowNull: false },
      // Path relative to UPLOAD_DIR; never taken from the uploaded name.
      storage_key: { type: DataTypes.STRING(200), allowNull: false },
      created_at: now,
    });
    await qi.addIndex('case_evidence', ['case_id']);
    await qi.createTable('case_messages', {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
      case_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      to_address: { type: DataTypes.STRING(254), allowNull: false },
      subject: { type: DataTypes.STRING(200), allowNull: false },
      text: { type: DataTypes.TEXT, allowNull: false },
      sent_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      status: { type: DataTypes.ENUM('queued', 'sent', 'failed'), allowNull: false, defaultValue: 'queued' },
      created_at: now,
      updated_at: now,
    });
    await qi.addIndex('case_messages', ['case_id']);
    // Transactional outbox of events for the upstream system (card blocked / unblocked ...).
    await qi.createTable('outgoing_events', {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
      type: { type: DataTypes.STRING(40), allowNull: false },
      payload: { type: DataTypes.TEXT, allowNull: false },
      status: { type: DataTypes.ENUM('pending', 'delivered', 'failed', 'undeliverable'), allowNull: false, defaultValue: 'pending' },
      attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
      last_error: { type: DataTypes.STRING(500), allowNull: true },
      created_at: now,
      delivered_at: { type: DataTypes.DATE(3), allowNull: true },
    });
    await qi.addIndex('outgoing_events', ['status', 'id']);
    await qi.createTable('user_preferences', {
      user_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
      pref_key: { type: DataTypes.STRING(40), primaryKey: true },
      value: { type: DataTypes.TEXT, allowNull: false },
      updated_at: now,
    });
    await qi.addColumn('cases', 'disposition_reason', { type: DataTypes.TEXT, allowNull: true });
    await qi.addColumn('cases', 'fraud_type', { type: DataTypes.STRING(32), allowNull: true });
    await qi.addColumn('cases', 'amount_confirmed_minor', { type: DataTypes.BIGINT, allowNull: true });
    await qi.addColumn('cases', 'amount_recovered_minor', { type: DataTypes.BIGINT, allowNull: true });
    await qi.addColumn('cases', 'closed_by', { type: DataTypes.INTEGER.UNSIGNED, allowNull: true });
    await qi.addColumn('cases', 'escalation_reason', { type: DataTypes.TEXT, allowNull: true });
    // The queue reads open cases only: a stored flag lets each sort use an index.
    await sequelize.query("ALTER TABLE cases ADD COLUMN is_open TINYINT AS (IF(status = 'closed', 0, 1)) STORED", { type: QueryTypes.RAW });
    await sequelize.query("ALTER TABLE cases ADD COLUMN priority_rank TINYINT AS (CASE priority WHEN 'urgent' THEN 3 WHEN 'high' THEN 2 ELSE 1 END) STORED", { type: QueryTypes.RAW });
    await qi.addIndex('cases', ['is_open', 'highest_probability']);
    await qi.addIndex('cases', ['is_open', 'sla_due_at']);
    await qi.addIndex('cases', ['is_open', 'first_alert_at']);
    await qi.addIndex('cases', ['is_open', 'last_alert_at']);
    await qi.addIndex('cases', ['is_open', 'amount_at_risk_minor']);
    await qi.addIndex('cases', ['is_open', 'priority_rank', 'sla_due_at']);
    await qi.addIndex('cases', ['is_open', 'assignee_id', 'priority_rank', 'sla_due_at']);
    await qi.addIndex('cases', ['closed_at']);
  },
  async down(qi) {
    for (const t of ['user_preferences', 'outgoing_events', 'case_messages', 'case_evidence', 'case_notes', 'cardholders']) await qi.dropTable(t);
    for (const c of ['disposition_reason', 'fraud_type', 'amount_confirmed_minor', 'amount_recovered_minor', 'closed_by', 'escalation_reason', 'is_open', 'priority_rank']) {
      await qi.removeColumn('cases', c);
    }
  },
};
