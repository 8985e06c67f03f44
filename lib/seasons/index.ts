/**
 * Running seasons (server side): editor, test piece, classes, rulebook, lifecycle, judges,
 * subscriptions and the organizer dashboard. Client code imports lib/seasons/schemas, time and
 * markdown directly (they carry no database code).
 */
export { managedSeason, organizesSeason, organizedSeasonIds, requireOrganizer, type Actor } from './context';
export { seasonOrganizers, addCoOrganizer, removeCoOrganizer, type SeasonOrganizerView } from './organizers';
export { createSeason, updateSeason, seasonFormValues, seasonJson } from './editor';
export { TEST_PIECE_UPLOAD, saveTestPiece, testPieceJson } from './testPiece';
export { measureStlFile } from './stlMeasure';
export { classJson, seasonClasses, createClass, updateClass, deleteClass, reorderClasses, type ClassJson } from './classes';
export { mergeRules } from './rulesMerge';
export { effectiveRules, ruleFromRow, rulebookRules, rulesFreeze, saveRulebook } from './rulebook';
export { reinspectSeason, startQueued, type Reinspection } from './reinspect';
export { NEXT_STATE, transitionBlockers, transitionSeason, requestReinspection } from './lifecycle';
export { seasonJudges, appointJudge, removeJudge, inviteJudge, revokeInvitation, viewInvitation, acceptInvitation, type InvitationView } from './judges';
export { isSubscribed, setSubscription, subscriberCount, notifySubscribers } from './subscriptions';
export { organizerDashboard, type SeasonDashboard, type JudgeLoad } from './dashboard';
