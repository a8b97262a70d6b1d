import { sequelize } from "~/lib/db.server";
import { Allocation } from "./Allocation";
import { AuditEntry } from "./AuditEntry";
import { BoardEntry } from "./BoardEntry";
import { CallAllocation } from "./CallAllocation";
import { Call } from "./Call";
import { CallReview } from "./CallReview";
import { CallOffer } from "./CallOffer";
import { ExecutedEpoch } from "./ExecutedEpoch";
import { Filter } from "./Filter";
import { Instrument } from "./Instrument";
import { Observation } from "./Observation";
import { OutgoingMail } from "./OutgoingMail";
import { PaymentEvent } from "./PaymentEvent";
import { PlannedEpoch } from "./PlannedEpoch";
import { Proposal } from "./Proposal";
import { ProposalMember } from "./ProposalMember";
import { ReviewAssignment } from "./ReviewAssignment";
import { ReviewHelpfulness } from "./ReviewHelpfulness";
import { ReviewerProfile } from "./ReviewerProfile";
import { ReviewPanelMember } from "./ReviewPanelMember";
import { RoleGrant } from "./RoleGrant";
import { SemesterCheck } from "./SemesterCheck";
import { UserSession } from "./Session";
import { RateLimitKey, SignInCode, SignInRequest } from "./SignIn";
import { StoredFile } from "./StoredFile";
import { Charge } from "./Charge";
import { DecisionBatch } from "./DecisionBatch";
import { DecisionLetter } from "./DecisionLetter";
import { DecisionMail } from "./DecisionMail";
import { DecisionTemplate } from "./DecisionTemplate";
import { Target } from "./Target";
import { Telescope } from "./Telescope";
import { TelescopeClearFraction } from "./TelescopeClearFraction";
import { User } from "./User";

for (const model of [
  User, RoleGrant, Telescope, Instrument, Filter, Call, CallOffer, Proposal, ProposalMember,
  Target, Observation, PlannedEpoch, StoredFile, OutgoingMail, AuditEntry, SignInRequest,
  SignInCode, PaymentEvent, UserSession, RateLimitKey,
  CallReview, ReviewPanelMember, ReviewerProfile, ReviewAssignment,
  TelescopeClearFraction, CallAllocation, BoardEntry, Allocation, SemesterCheck,
  Charge, ExecutedEpoch, DecisionTemplate, DecisionBatch, DecisionLetter, DecisionMail,
  ReviewHelpfulness,
]) {
  model.initModel(sequelize);
}

User.hasMany(RoleGrant, { foreignKey: "userId", as: "roleGrants" });
Proposal.hasMany(Charge, { foreignKey: "proposalId", as: "charges" });
Charge.belongsTo(Proposal, { foreignKey: "proposalId", as: "proposal" });
Charge.belongsTo(Call, { foreignKey: "callId", as: "call" });
Charge.belongsTo(User, { foreignKey: "waivedById", as: "waivedBy" });
User.hasMany(UserSession, { foreignKey: "userId", as: "sessions" });
UserSession.belongsTo(User, { foreignKey: "userId", as: "user" });
RoleGrant.belongsTo(User, { foreignKey: "userId", as: "user" });
RoleGrant.belongsTo(User, { foreignKey: "grantedById", as: "grantedBy" });

Telescope.hasMany(Instrument, { foreignKey: "telescopeId", as: "instruments" });
Instrument.belongsTo(Telescope, { foreignKey: "telescopeId", as: "telescope" });
Instrument.hasMany(Filter, { foreignKey: "instrumentId", as: "filters" });
Filter.belongsTo(Instrument, { foreignKey: "instrumentId", as: "instrument" });

Call.hasMany(CallOffer, { foreignKey: "callId", as: "offers" });
CallOffer.belongsTo(Call, { foreignKey: "callId", as: "call" });
CallOffer.belongsTo(Telescope, { foreignKey: "telescopeId", as: "telescope" });

Call.hasMany(Proposal, { foreignKey: "callId", as: "proposals" });
Proposal.belongsTo(Call, { foreignKey: "callId", as: "call" });
Proposal.belongsTo(User, { foreignKey: "createdById", as: "createdBy" });
Proposal.hasMany(ProposalMember, { foreignKey: "proposalId", as: "members" });
ProposalMember.belongsTo(Proposal, { foreignKey: "proposalId", as: "proposal" });
ProposalMember.belongsTo(User, { foreignKey: "userId", as: "user" });
Proposal.hasMany(Target, { foreignKey: "proposalId", as: "targets" });
Target.belongsTo(Proposal, { foreignKey: "proposalId", as: "proposal" });
Proposal.hasMany(Observation, { foreignKey: "proposalId", as: "observations" });
Observation.belongsTo(Proposal, { foreignKey: "proposalId", as: "proposal" });
Observation.belongsTo(Target, { foreignKey: "targetId", as: "target" });
Target.hasMany(Observation, { foreignKey: "targetId", as: "observations" });
Observation.belongsTo(Instrument, { foreignKey: "instrumentId", as: "instrument" });
Observation.belongsTo(Filter, { foreignKey: "filterId", as: "filter" });
Observation.hasMany(PlannedEpoch, { foreignKey: "observationId", as: "epochs" });
PlannedEpoch.belongsTo(Observation, { foreignKey: "observationId", as: "observation" });
Observation.hasMany(ExecutedEpoch, { foreignKey: "observationId", as: "executedEpochs" });
ExecutedEpoch.belongsTo(Observation, { foreignKey: "observationId", as: "observation" });
Proposal.hasMany(StoredFile, { foreignKey: "proposalId", as: "files" });
StoredFile.belongsTo(Proposal, { foreignKey: "proposalId", as: "proposal" });
StoredFile.belongsTo(User, { foreignKey: "uploadedById", as: "uploadedBy" });

Call.hasOne(CallReview, { foreignKey: "callId", as: "review" });
CallReview.belongsTo(Call, { foreignKey: "callId", as: "call" });
ReviewPanelMember.belongsTo(Call, { foreignKey: "callId", as: "call" });
ReviewPanelMember.belongsTo(User, { foreignKey: "reviewerId", as: "reviewer" });
User.hasOne(ReviewerProfile, { foreignKey: "userId", as: "reviewerProfile" });
ReviewerProfile.belongsTo(User, { foreignKey: "userId", as: "user" });
ReviewAssignment.belongsTo(Call, { foreignKey: "callId", as: "call" });
ReviewAssignment.belongsTo(Proposal, { foreignKey: "proposalId", as: "proposal" });
ReviewAssignment.belongsTo(User, { foreignKey: "reviewerId", as: "reviewer" });
Proposal.hasMany(ReviewAssignment, { foreignKey: "proposalId", as: "reviewAssignments" });
ReviewHelpfulness.belongsTo(ReviewAssignment, { foreignKey: "assignmentId", as: "assignment" });
ReviewHelpfulness.belongsTo(User, { foreignKey: "raterId", as: "rater" });

Telescope.hasMany(TelescopeClearFraction, { foreignKey: "telescopeId", as: "clearFractions" });
TelescopeClearFraction.belongsTo(Telescope, { foreignKey: "telescopeId", as: "telescope" });
CallAllocation.belongsTo(Call, { foreignKey: "callId", as: "call" });
CallAllocation.belongsTo(User, { foreignKey: "lockedById", as: "lockedBy" });
BoardEntry.belongsTo(Call, { foreignKey: "callId", as: "call" });
BoardEntry.belongsTo(Proposal, { foreignKey: "proposalId", as: "proposal" });
Proposal.hasOne(BoardEntry, { foreignKey: "proposalId", as: "boardEntry" });
Allocation.belongsTo(Call, { foreignKey: "callId", as: "call" });
Allocation.belongsTo(Proposal, { foreignKey: "proposalId", as: "proposal" });
Allocation.belongsTo(Telescope, { foreignKey: "telescopeId", as: "telescope" });
Proposal.hasMany(Allocation, { foreignKey: "proposalId", as: "allocations" });
SemesterCheck.belongsTo(Call, { foreignKey: "callId", as: "call" });
SemesterCheck.belongsTo(User, { foreignKey: "requestedById", as: "requestedBy" });

DecisionLetter.belongsTo(Proposal, { foreignKey: "proposalId", as: "proposal" });
DecisionLetter.belongsTo(Call, { foreignKey: "callId", as: "call" });
DecisionLetter.belongsTo(DecisionBatch, { foreignKey: "batchId", as: "batch" });
DecisionLetter.belongsTo(Charge, { foreignKey: "chargeId", as: "charge" });
DecisionLetter.belongsTo(User, { foreignKey: "sentById", as: "sentBy" });
Proposal.hasOne(DecisionLetter, { foreignKey: "proposalId", as: "decisionLetter" });
DecisionBatch.belongsTo(Call, { foreignKey: "callId", as: "call" });
DecisionBatch.belongsTo(User, { foreignKey: "createdById", as: "createdBy" });
DecisionMail.belongsTo(DecisionBatch, { foreignKey: "batchId", as: "batch" });
DecisionMail.belongsTo(DecisionLetter, { foreignKey: "letterId", as: "letter" });
DecisionMail.belongsTo(OutgoingMail, { foreignKey: "outgoingMailId", as: "outgoingMail" });
DecisionTemplate.belongsTo(User, { foreignKey: "updatedById", as: "updatedBy" });

AuditEntry.belongsTo(User, { foreignKey: "actorId", as: "actor" });
AuditEntry.belongsTo(Proposal, { foreignKey: "proposalId", as: "proposal" });

export {
  sequelize, AuditEntry, Call, CallOffer, Filter, Instrument, Observation, OutgoingMail,
  PaymentEvent, PlannedEpoch, Proposal, ProposalMember, RoleGrant, SignInCode, SignInRequest,
  StoredFile, Target, Telescope, User, UserSession, RateLimitKey,
  CallReview, ReviewPanelMember, ReviewerProfile, ReviewAssignment,
  TelescopeClearFraction, CallAllocation, BoardEntry, Allocation, SemesterCheck, Charge, ExecutedEpoch,
  DecisionTemplate, DecisionBatch, DecisionLetter, DecisionMail, ReviewHelpfulness,
};
