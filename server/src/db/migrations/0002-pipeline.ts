import { DataTypes, QueryTypes } from 'sequelize';
import type { Migration } from '../migrator';

/**
 * The transaction pipeline: API keys, cards (tokenised), transactions,
 * features, scores, alerts, cases, labels, model versions and settings.
 */
export const m0002: Migration = {
  name: '0002-pipeline',
  async up(qi, sequelize) {
    const now = { type: DataTypes.DATE(3), allowNull: false };
    await qi.createTable('api_keys', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      name: { type: DataTypes.STRING(80), allowNull: false },
      // The first characters, shown to admins so they can tell keys apart.
      key_prefix: { type: DataTypes.STRING(16), allowNull: false },
      // SHA-256 of the whole key: keys are 32 random bytes, so a fast hash is enough (no dictionary to guess from).
      key_hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
      scopes: { type: DataTypes.STRING(255), allowNull: false },
      created_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      last_used_at: { type: DataTypes.DATE(3), allowNull: true },
      revoked_at: { type: DataTypes.DATE(3), allowNull: true },
      created_at: now,
      updated_at: now,
    });

    await qi.createTable('cards', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      // HMAC-SHA-256 of the PAN under PAN_HMAC_KEY: matches a card without storing its number.
      pan_hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
      bin: { type: DataTypes.CHAR(6), allowNull: false },
      last4: { type: DataTypes.CHAR(4), allowNull: false },
      cardholder_ref: { type: DataTypes.STRING(64), allowNull: false },
      status: { type: DataTypes.ENUM('active', 'blocked'), allowNull: false, defaultValue: 'active' },
      status_changed_at: { type: DataTypes.DATE(3), allowNull: true },
      created_at: now,
      updated_at: now,
    });
    await qi.addIndex('cards', ['cardholder_ref']);

    await qi.createTable('transactions', {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
      external_id: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      source: { type: DataTypes.ENUM('api', 'decision', 'csv', 'seed'), allowNull: false },
      ingest_batch: { type: DataTypes.CHAR(36), allowNull: false },
      api_key_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      card_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      occurred_at: { type: DataTypes.DATE(3), allowNull: false },
      received_at: { type: DataTypes.DATE(3), allowNull: false },
      amount_minor: { type: DataTypes.BIGINT, allowNull: false },
      currency: { type: DataTypes.CHAR(3), allowNull: false },
      currency_exponent: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
      merchant_ref: { type: DataTypes.STRING(64), allowNull: false },
      merchant_name: { type: DataTypes.STRING(120), allowNull: false },
      mcc: { type: DataTypes.CHAR(4), allowNull: false },
      merchant_country: { type: DataTypes.CHAR(2), allowNull: false },
      card_present: { type: DataTypes.BOOLEAN, allowNull: false },
      channel: { type: DataTypes.ENUM('pos', 'ecommerce', 'atm', 'moto', 'contactless'), allowNull: false },
      device_id: { type: DataTypes.STRING(128), allowNull: true },
      ip: { type: DataTypes.STRING(45), allowNull: true },
      lat: { type: DataTypes.DOUBLE, allowNull: true },
      lon: { type: DataTypes.DOUBLE, allowNull: true },
      // historical: back-filled rows that were never scored live (seed, CSV back-fill); they feed training only.
      status: { type: DataTypes.ENUM('accepted', 'scored', 'historical'), allowNull: false, defaultValue: 'accepted' },
    });
    await qi.addIndex('transactions', ['card_id', 'occurred_at']);
    await qi.addIndex('transactions', ['occurred_at']);
    await qi.addIndex('transactions', ['status', 'received_at']);
    await qi.addIndex('transactions', ['device_id']);
    await qi.addIndex('transactions', ['ip']);

    await qi.createTable('model_versions', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      label: { type: DataTypes.STRING(40), allowNull: false, unique: true },
      role: { type: DataTypes.ENUM('champion', 'challenger', 'retired', 'candidate'), allowNull: false },
      model_json: { type: DataTypes.TEXT('long'), allowNull: false },
      params: { type: DataTypes.TEXT, allowNull: true },
      metrics: { type: DataTypes.TEXT('medium'), allowNull: true },
      data_from: { type: DataTypes.DATE(3), allowNull: true },
      data_to: { type: DataTypes.DATE(3), allowNull: true },
      train_rows: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      notes: { type: DataTypes.TEXT, allowNull: true },
      created_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      promoted_at: { type: DataTypes.DATE(3), allowNull: true },
      created_at: now,
      updated_at: now,
    });
    await qi.addIndex('model_versions', ['role']);

    await qi.createTable('transaction_features', {
      transaction_id: { type: DataTypes.BIGINT.UNSIGNED, primaryKey: true },
      features: { type: DataTypes.TEXT, allowNull: false },
      computed_at: now,
    });

    // One row per transaction: the primary key is what makes "scored exactly once" hold.
    await qi.createTable('transaction_scores', {
      transaction_id: { type: DataTypes.BIGINT.UNSIGNED, primaryKey: true },
      model_version_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      margin: { type: DataTypes.DOUBLE, allowNull: false },
      normalized_margin: { type: DataTypes.DOUBLE, allowNull: false },
      probability: { type: DataTypes.DOUBLE, allowNull: false },
      reasons: { type: DataTypes.TEXT, allowNull: false },
      alerted: { type: DataTypes.BOOLEAN, allowNull: false },
      threshold: { type: DataTypes.DOUBLE, allowNull: false },
      scored_at: now,
      latency_ms: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    });
    await qi.addIndex('transaction_scores', ['model_version_id', 'scored_at']);
    await qi.addIndex('transaction_scores', ['scored_at']);

    await qi.createTable('shadow_scores', {
      transaction_id: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false },
      model_version_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      margin: { type: DataTypes.DOUBLE, allowNull: false },
      probability: { type: DataTypes.DOUBLE, allowNull: false },
      would_alert: { type: DataTypes.BOOLEAN, allowNull: false },
      scored_at: now,
    });
    await qi.addConstraint('shadow_scores', { type: 'primary key', fields: ['transaction_id', 'model_version_id'] });

    await qi.createTable('cases', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      card_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      // Equals card_id while the case is open, NULL once closed: the unique index allows one open case per card.
      open_card_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, unique: true },
      status: { type: DataTypes.ENUM('new', 'claimed', 'waiting_cardholder', 'escalated', 'awaiting_approval', 'closed'), allowNull: false },
      priority: { type: DataTypes.ENUM('standard', 'high', 'urgent'), allowNull: false, defaultValue: 'standard' },
      assignee_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      highest_probability: { type: DataTypes.DOUBLE, allowNull: false },
      highest_margin: { type: DataTypes.DOUBLE, allowNull: false },
      amount_at_risk_minor: { type: DataTypes.BIGINT, allowNull: false },
      currency: { type: DataTypes.CHAR(3), allowNull: false },
      currency_exponent: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
      alert_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      first_alert_at: now,
      last_alert_at: now,
      sla_due_at: now,
      mcc: { type: DataTypes.CHAR(4), allowNull: false },
      merchant_country: { type: DataTypes.CHAR(2), allowNull: false },
      channel: { type: DataTypes.STRING(16), allowNull: false },
      disposition: { type: DataTypes.ENUM('confirmed_fraud', 'legitimate', 'inconclusive'), allowNull: true },
      closed_at: { type: DataTypes.DATE(3), allowNull: true },
      version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
      created_at: now,
      updated_at: now,
    });
    await qi.addIndex('cases', ['status', 'sla_due_at']);
    await qi.addIndex('cases', ['status', 'highest_probability']);
    await qi.addIndex('cases', ['assignee_id', 'status']);
    await qi.addIndex('cases', ['card_id']);

    await qi.createTable('alerts', {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
      // One alert per transaction at most, whatever retries happen.
      transaction_id: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false, unique: true },
      case_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      probability: { type: DataTypes.DOUBLE, allowNull: false },
      created_at: now,
    });
    await qi.addIndex('alerts', ['case_id']);

    await qi.createTable('labels', {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
      transaction_id: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false },
      label: { type: DataTypes.ENUM('fraud', 'legitimate'), allowNull: false },
      fraud_type: { type: DataTypes.STRING(32), allowNull: true },
      source: { type: DataTypes.ENUM('disposition', 'chargeback', 'backfill', 'seed'), allowNull: false },
      reported_at: now,
      case_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      created_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      created_at: now,
    });
    await qi.addIndex('labels', ['transaction_id']);
    await qi.addIndex('labels', ['reported_at']);

    await qi.createTable('settings', {
      key: { type: DataTypes.STRING(64), primaryKey: true },
      value: { type: DataTypes.TEXT, allowNull: false },
      updated_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      updated_at: now,
    });
    await sequelize.query(
      "INSERT INTO settings (`key`, value, updated_at) VALUES ('alerting', ?, UTC_TIMESTAMP(3))",
      { replacements: [JSON.stringify({ threshold: 0.5, reviewBand: 0.2, declineBand: 0.9 })], type: QueryTypes.INSERT },
    );
  },
  async down(qi) {
    for (const t of ['settings', 'labels', 'alerts', 'cases', 'shadow_scores', 'transaction_scores', 'transaction_features', 'model_versions', 'transactions', 'cards', 'api_keys']) {
      await qi.dropTable(t);
    }
  },
};
