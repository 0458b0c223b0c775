import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { ArrayRevision } from './array-revision';
import type { EstimateRun } from './estimate-run';
import type { Team } from './team';
import type { User } from './user';

export const reviewKinds = ['comment', 'approval', 'changes-requested'] as const;
export type ReviewKind = (typeof reviewKinds)[number];

/** A reviewer's comment, approval (sign-off) or request for changes on one array revision or one run. */
export class Review extends Model<InferAttributes<Review>, InferCreationAttributes<Review>> {
  declare id: CreationOptional<number>;
  declare teamId: ForeignKey<Team['id']>;
  declare arrayRevisionId: ForeignKey<ArrayRevision['id']> | null;
  declare estimateRunId: ForeignKey<EstimateRun['id']> | null;
  declare authorId: ForeignKey<User['id']> | null;
  declare kind: ReviewKind;
  declare body: string;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Review.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        kind: { type: DataTypes.STRING(24), allowNull: false },
        body: { type: DataTypes.TEXT, allowNull: false },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'reviews', modelName: 'Review', updatedAt: false },
    );
  }
}
