import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { MailAttachmentRecord } from './types';

export class MailOutbox extends Model<InferAttributes<MailOutbox>, InferCreationAttributes<MailOutbox>> {
  declare id: CreationOptional<number>;
  declare to: string[];
  declare subject: string;
  declare html: string;
  declare text: string;
  declare attachments: CreationOptional<MailAttachmentRecord[]>;
  declare status: CreationOptional<'queued' | 'sent' | 'failed'>;
  declare attempts: CreationOptional<number>;
  declare lastError: string | null;
  declare nextAttemptAt: CreationOptional<Date>;
  declare sentAt: Date | null;
  declare claimedUntil: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    MailOutbox.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        to: { type: DataTypes.ARRAY(DataTypes.STRING(254)), allowNull: false },
        subject: { type: DataTypes.STRING(300), allowNull: false },
        html: { type: DataTypes.TEXT, allowNull: false },
        text: { type: DataTypes.TEXT, allowNull: false },
        attachments: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
        status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'queued' },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        lastError: { type: DataTypes.TEXT, allowNull: true },
        nextAttemptAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        sentAt: { type: DataTypes.DATE, allowNull: true },
        claimedUntil: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'MailOutbox', tableName: 'mail_outbox', underscored: true },
    );
  }
}
