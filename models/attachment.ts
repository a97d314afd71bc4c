import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class Attachment extends Model<InferAttributes<Attachment>, InferCreationAttributes<Attachment>> {
  declare id: CreationOptional<number>;
  declare ownerType: 'tube-type' | 'bench-check';
  declare ownerId: number;
  declare kind: 'datasheet' | 'photo' | 'other';
  declare fileName: string;
  declare contentType: string;
  declare byteSize: number;
  declare objectKey: string;
  declare uploadedById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Attachment.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        ownerType: { type: DataTypes.STRING(30), allowNull: false },
        ownerId: { type: DataTypes.INTEGER, allowNull: false },
        kind: { type: DataTypes.STRING(20), allowNull: false },
        fileName: { type: DataTypes.STRING(200), allowNull: false },
        contentType: { type: DataTypes.STRING(100), allowNull: false },
        byteSize: { type: DataTypes.INTEGER, allowNull: false },
        objectKey: { type: DataTypes.STRING(300), allowNull: false },
        uploadedById: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Attachment', tableName: 'attachments', underscored: true },
    );
  }
}
