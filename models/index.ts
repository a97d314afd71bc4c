import type { Sequelize } from 'sequelize';
import { Attachment } from './attachment';
import { AuditEvent } from './audit-event';
import { BenchCheck } from './bench-check';
import { CurveFit } from './curve-fit';
import { CurvePoint } from './curve-point';
import { CurveSet } from './curve-set';
import { Decision } from './decision';
import { Invitation } from './invitation';
import { ExploreRun } from './explore-run';
import { MailOutbox } from './mail-outbox';
import { Project } from './project';
import { ProjectWatcher } from './project-watcher';
import { Revision } from './revision';
import { SignInAttempt } from './sign-in-attempt';
import { Stage } from './stage';
import { TubeModel } from './tube-model';
import { TubeType } from './tube-type';
import { User } from './user';

let initialised = false;

export function initModels(sequelize: Sequelize) {
  if (initialised) return;
  for (const m of [User, Invitation, AuditEvent, SignInAttempt, TubeType, TubeModel, CurveSet, CurvePoint, CurveFit, Attachment, Project, ProjectWatcher, Stage, BenchCheck, Revision, Decision, MailOutbox, ExploreRun]) {
    m.initModel(sequelize);
  }
  TubeType.hasMany(TubeModel, { foreignKey: 'tubeTypeId', as: 'models' });
  TubeModel.belongsTo(TubeType, { foreignKey: 'tubeTypeId', as: 'tubeType' });
  TubeType.hasMany(CurveSet, { foreignKey: 'tubeTypeId', as: 'curveSets' });
  CurveSet.belongsTo(TubeType, { foreignKey: 'tubeTypeId', as: 'tubeType' });
  CurveSet.hasMany(CurvePoint, { foreignKey: 'curveSetId', as: 'points' });
  CurveSet.hasMany(CurveFit, { foreignKey: 'curveSetId', as: 'fits' });
  Project.hasMany(Stage, { foreignKey: 'projectId', as: 'stages' });
  Stage.belongsTo(Project, { foreignKey: 'projectId', as: 'project' });
  Stage.belongsTo(TubeType, { foreignKey: 'tubeTypeId', as: 'tubeType' });
  Project.belongsTo(User, { foreignKey: 'ownerId', as: 'owner' });
  Project.hasMany(Revision, { foreignKey: 'projectId', as: 'revisions' });
  Revision.belongsTo(Project, { foreignKey: 'projectId', as: 'project' });
  Revision.hasOne(Decision, { foreignKey: 'revisionId', as: 'decision' });
  BenchCheck.belongsTo(Stage, { foreignKey: 'stageId', as: 'stage' });
  AuditEvent.belongsTo(User, { foreignKey: 'actorId', as: 'actor' });
  ExploreRun.belongsTo(Stage, { foreignKey: 'stageId', as: 'stage' });
  initialised = true;
}

export { Attachment, AuditEvent, BenchCheck, CurveFit, CurvePoint, CurveSet, Decision, ExploreRun, Invitation, MailOutbox, Project, ProjectWatcher, Revision, SignInAttempt, Stage, TubeModel, TubeType, User };
export type { Role } from './user';
export { ROLES } from './user';
export * from './types';
