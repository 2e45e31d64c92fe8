import { DataTypes, Model, type ModelStatic, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import type { Role } from '@shared/auth/roles';

export class UserModel extends Model<InferAttributes<UserModel>, InferCreationAttributes<UserModel>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare displayName: string;
  declare role: Role;
  declare status: CreationOptional<'active' | 'invited' | 'deactivated'>;
  declare passwordHash: string | null;
  declare failedLoginCount: CreationOptional<number>;
  declare lockedUntil: Date | null;
  declare lastLoginAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class SessionModel extends Model<InferAttributes<SessionModel>, InferCreationAttributes<SessionModel>> {
  declare sid: string;
  declare expires: Date | null;
  declare data: string | null;
  declare userId: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class AuditLogModel extends Model<InferAttributes<AuditLogModel>, InferCreationAttributes<AuditLogModel>> {
  declare id: CreationOptional<number>;
  declare occurredAt: Date;
  declare actorType: 'user' | 'api_key' | 'system' | 'anonymous';
  declare actorId: string | null;
  declare actorLabel: string | null;
  declare action: string;
  declare targetType: string | null;
  declare targetId: string | null;
  declare outcome: 'success' | 'failure' | 'denied';
  declare ip: string | null;
  declare userAgent: string | null;
  declare details: string | null;
  declare prevHash: string;
  declare hash: string;
}

export interface Models {
  User: ModelStatic<UserModel>;
  Session: ModelStatic<SessionModel>;
  AuditLog: ModelStatic<AuditLogModel>;
}

/**
 * Registers every model once, at start-up, on the given Sequelize instance.
 * `define` (not `Model.init`) keeps models bound to their own instance, so two
 * servers in one process (tests, tools) never share a closed connection pool.
 * The classes above serve as the row types.
 */
export function registerModels(sequelize: Sequelize): Models {
  const User = sequelize.define<UserModel>('User',
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
      displayName: { type: DataTypes.STRING(120), allowNull: false },
      role: { type: DataTypes.ENUM('investigator', 'supervisor', 'data_scientist', 'admin'), allowNull: false },
      status: { type: DataTypes.ENUM('active', 'invited', 'deactivated'), allowNull: false, defaultValue: 'active' },
      passwordHash: { type: DataTypes.STRING(255), allowNull: true },
      failedLoginCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
      lockedUntil: { type: DataTypes.DATE(3), allowNull: true },
      lastLoginAt: { type: DataTypes.DATE(3), allowNull: true },
      createdAt: DataTypes.DATE(3),
      updatedAt: DataTypes.DATE(3),
    },
    { tableName: 'users' },
  );
  const Session = sequelize.define<SessionModel>('Session',
    {
      sid: { type: DataTypes.STRING(64), primaryKey: true },
      expires: { type: DataTypes.DATE(3), allowNull: true },
      data: { type: DataTypes.TEXT, allowNull: true },
      userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE(3),
      updatedAt: DataTypes.DATE(3),
    },
    { tableName: 'sessions' },
  );
  const AuditLog = sequelize.define<AuditLogModel>('AuditLog',
    {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
      occurredAt: { type: DataTypes.DATE(3), allowNull: false },
      actorType: { type: DataTypes.ENUM('user', 'api_key', 'system', 'anonymous'), allowNull: false },
      actorId: { type: DataTypes.STRING(64), allowNull: true },
      actorLabel: { type: DataTypes.STRING(254), allowNull: true },
      action: { type: DataTypes.STRING(64), allowNull: false },
      targetType: { type: DataTypes.STRING(32), allowNull: true },
      targetId: { type: DataTypes.STRING(64), allowNull: true },
      outcome: { type: DataTypes.ENUM('success', 'failure', 'denied'), allowNull: false },
      ip: { type: DataTypes.STRING(45), allowNull: true },
      userAgent: { type: DataTypes.STRING(255), allowNull: true },
      details: { type: DataTypes.TEXT, allowNull: true },
      prevHash: { type: DataTypes.CHAR(64), allowNull: false },
      hash: { type: DataTypes.CHAR(64), allowNull: false },
    },
    { tableName: 'audit_log', timestamps: false },
  );
  return { User, Session, AuditLog };
}
