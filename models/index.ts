/**
 * Initializes every model once per process on the shared connection and wires the associations.
 * Import models from here (`import { models } from '@/models'`) so they are always initialized.
 */
import { getSequelize } from '@/lib/db';
import { User } from './User';
import { AuthToken } from './AuthToken';
import { Season } from './Season';
import { TestPiece } from './TestPiece';
import { SeasonJudge } from './SeasonJudge';
import { ContestClass } from './ContestClass';
import { Rule } from './Rule';
import { Machine } from './Machine';
import { ExtrusionTest } from './ExtrusionTest';
import { Entry } from './Entry';
import { StoredFile } from './StoredFile';
import { Inspection } from './Inspection';
import { Review } from './Review';
import { AuditEvent } from './AuditEvent';
import { SentMail } from './SentMail';
import { SeasonSubscription } from './SeasonSubscription';
import { JudgeInvitation } from './JudgeInvitation';
import { SeasonOrganizer } from './SeasonOrganizer';
import { EntryReinspection } from './EntryReinspection';
import { GcodeFingerprint } from './GcodeFingerprint';

export {
  User, AuthToken, Season, TestPiece, SeasonJudge, ContestClass, Rule, Machine,
  ExtrusionTest, Entry, StoredFile, Inspection, Review, AuditEvent, SentMail,
  SeasonSubscription, JudgeInvitation, SeasonOrganizer, EntryReinspection, GcodeFingerprint,
};

const ALL = [
  User, AuthToken, Season, TestPiece, SeasonJudge, ContestClass, Rule, Machine,
  ExtrusionTest, Entry, StoredFile, Inspection, Review, AuditEvent, SentMail,
  SeasonSubscription, JudgeInvitation, SeasonOrganizer, EntryReinspection, GcodeFingerprint,
];

function associate() {
  User.hasMany(AuthToken, { foreignKey: 'userId' });
  AuthToken.belongsTo(User, { foreignKey: 'userId' });

  Season.belongsTo(User, { as: 'createdBy', foreignKey: 'createdById' });
  Season.hasOne(TestPiece, { foreignKey: 'seasonId' });
  TestPiece.belongsTo(Season, { foreignKey: 'seasonId' });
  TestPiece.belongsTo(StoredFile, { foreignKey: 'storedFileId' });
  Season.hasMany(ContestClass, { as: 'classes', foreignKey: 'seasonId' });
  ContestClass.belongsTo(Season, { foreignKey: 'seasonId' });
  Season.hasMany(Rule, { foreignKey: 'seasonId' });
  Rule.belongsTo(Season, { foreignKey: 'seasonId' });
  Rule.belongsTo(ContestClass, { foreignKey: 'classId' });
  Season.belongsToMany(User, { through: SeasonJudge, as: 'judges', foreignKey: 'seasonId', otherKey: 'userId' });
  User.belongsToMany(Season, { through: SeasonJudge, as: 'judgedSeasons', foreignKey: 'userId', otherKey: 'seasonId' });

  User.hasMany(Machine, { foreignKey: 'ownerId' });
  Machine.belongsTo(User, { as: 'owner', foreignKey: 'ownerId' });
  Machine.hasMany(ExtrusionTest, { foreignKey: 'machineId' });
  ExtrusionTest.belongsTo(Machine, { foreignKey: 'machineId' });

  Entry.belongsTo(Season, { foreignKey: 'seasonId' });
  Entry.belongsTo(ContestClass, { as: 'class', foreignKey: 'classId' });
  Entry.belongsTo(User, { as: 'entrant', foreignKey: 'entrantId' });
  Entry.belongsTo(Machine, { foreignKey: 'machineId' });
  Season.hasMany(Entry, { foreignKey: 'seasonId' });
  Entry.hasMany(StoredFile, { as: 'files', foreignKey: 'entryId' });
  StoredFile.belongsTo(Entry, { foreignKey: 'entryId' });
  StoredFile.belongsTo(User, { as: 'owner', foreignKey: 'ownerId' });
  Entry.hasMany(Inspection, { foreignKey: 'entryId' });
  Inspection.belongsTo(Entry, { foreignKey: 'entryId' });
  Inspection.belongsTo(StoredFile, { foreignKey: 'storedFileId' });
  Entry.hasMany(Review, { foreignKey: 'entryId' });
  Review.belongsTo(Entry, { foreignKey: 'entryId' });
  Review.belongsTo(User, { as: 'judge', foreignKey: 'judgeId' });

  AuditEvent.belongsTo(User, { as: 'actor', foreignKey: 'actorId' });

  SeasonSubscription.belongsTo(Season, { foreignKey: 'seasonId' });
  SeasonSubscription.belongsTo(User, { foreignKey: 'userId' });
  JudgeInvitation.belongsTo(Season, { foreignKey: 'seasonId' });
  JudgeInvitation.belongsTo(User, { as: 'invitedBy', foreignKey: 'invitedById' });
}

export function initModels() {
  const sequelize = getSequelize();
  // Checked on the class itself: a dev-server reload re-evaluates this module with fresh classes.
  if (User.sequelize) return sequelize;
  for (const model of ALL) model.initModel(sequelize);
  associate();
  return sequelize;
}

initModels();
