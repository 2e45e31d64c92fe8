import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator';

/**
 * Supervision and administration: named investigator groups and the ordered
 * routing rules that send new cases to them, four-eyes approvals of
 * high-value dispositions, one-time invitation tokens, and when the current
 * holder of a case took it (for handling times).
 */
export const m0005: Migration = {
  name: '0005-supervision',
  async up(qi) {
    const now = { type: DataTypes.DATE(3), allowNull: false };
    await qi.createTable('investigator_groups', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      name: { type: DataTypes.STRING(60), allowNull: false, unique: true },
      strategy: { type: DataTypes.ENUM('round_robin', 'least_loaded'), allowNull: false },
      // Round-robin turn: the member who got the previous case.
      last_assigned_user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      created_at: now,
      updated_at: now,
    });
    await qi.createTable('investigator_group_members', {
      group_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
      user_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
    });
    await qi.addIndex('investigator_group_members', ['user_id']);
    await qi.createTable('routing_rules', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      position: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      name: { type: DataTypes.STRING(60), allowNull: false },
      // Major units of the case's own currency; NULL: any amount.
      min_amount: { type: DataTypes.DECIMAL(18, 3), allowNull: true },
      // Comma-separated lists; empty: any.
      mccs: { type: DataTypes.STRING(300), allowNull: false, defaultValue: '' },
      countries: { type: DataTypes.STRING(200), allowNull: false, defaultValue: '' },
      channels: { type: DataTypes.STRING(80), allowNull: false, defaultValue: '' },
      group_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      created_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      created_at: now,
      updated_at: now,
    });
    await qi.addIndex('routing_rules', ['position']);
    await qi.createTable('case_approvals', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      case_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      proposed_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      disposition: { type: DataTypes.ENUM('confirmed_fraud', 'legitimate', 'inconclusive'), allowNull: false },
      fraud_type: { type: DataTypes.STRING(32), allowNull: true },
      reason: { type: DataTypes.TEXT, allowNull: false },
      amount_confirmed_minor: { type: DataTypes.BIGINT, allowNull: true },
      amount_recovered_minor: { type: DataTypes.BIGINT, allowNull: true },
      status: { type: DataTypes.ENUM('pending', 'approved', 'rejected'), allowNull: false, defaultValue: 'pending' },
      decided_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      decided_at: { type: DataTypes.DATE(3), allowNull: true },
      decision_note: { type: DataTypes.TEXT, allowNull: true },
      created_at: now,
    });
    await qi.addIndex('case_approvals', ['status', 'created_at']);
    await qi.addIndex('case_approvals', ['case_id']);
    await qi.createTable('user_invites', {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      // SHA-256 of the token: 32 random bytes, so a fast hash suffices (nothing to guess from).
      token_hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
      expires_at: now,
      used_at: { type: DataTypes.DATE(3), allowNull: true },
      created_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      created_at: now,
    });
    await qi.addIndex('user_invites', ['user_id']);
    // When the current holder took the case (claim, routing or reassignment): handling time is claimed_at → closed_at.
    await qi.addColumn('cases', 'claimed_at', { type: DataTypes.DATE(3), allowNull: true });
    await qi.addIndex('alerts', ['created_at']);
    await qi.addIndex('cases', ['created_at']);
  },
  async down(qi) {
    await qi.removeIndex('cases', ['created_at']);
    await qi.removeIndex('alerts', ['created_at']);
    await qi.removeColumn('cases', 'claimed_at');
    for (const t of ['user_invites', 'case_approvals', 'routing_rules', 'investigator_group_members', 'investigator_groups']) await qi.dropTable(t);
  },
};
