import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class SignInAttempt extends Model<InferAttributes<SignInAttempt>, InferCreationAttributes<SignInAttempt>> {
  declare key: string;
  declare failures: CreationOptional<number>;
  declare firstFailureAt: CreationOptional<Date>;
  declare lockedUntil: Date | null;

  static initModel(sequelize: Sequelize) {
    SignInAttempt.init(
      {
        key: { type: DataTypes.STRING(300), primaryKey: true },
        failures: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        firstFailureAt: { type: DataTypes.DATE, allowNull: false },
        lockedUntil: { type: DataTypes.DATE, allowNull: true },
      },
      { sequelize, modelName: 'SignInAttempt', tableName: 'sign_in_attempts', underscored: true, timestamps: false },
    );
  }
}
