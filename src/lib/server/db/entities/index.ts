import { UserSchema } from './user';
import { AuditEventSchema } from './audit-event';
import { OneTimeLinkSchema } from './one-time-link';
import { ApiTokenSchema } from './api-token';
import { SignInAttemptSchema } from './sign-in-attempt';
import { ProductSchema } from './product';
import { LoopClassSchema } from './loop-class';
import { RequirementSchema } from './requirement';
import { LoopSchema } from './loop';
import { DeviationSchema } from './deviation';
import { RevisionSchema } from './revision';
import { MarginReportSchema } from './margin-report';
import { VerdictEventSchema } from './verdict-event';
import { VerdictDigestSchema } from './verdict-digest';
import { ReportExportSchema } from './report-export';

/** Every entity the ORM knows; migrations are generated from this list. */
export const entities = [UserSchema, AuditEventSchema, OneTimeLinkSchema, ApiTokenSchema, SignInAttemptSchema,
	// registry
	ProductSchema, LoopClassSchema, RequirementSchema, LoopSchema, DeviationSchema,
	// revisions and verdicts
	RevisionSchema, MarginReportSchema, VerdictEventSchema, VerdictDigestSchema,
	// reports
	ReportExportSchema];

export { UserSchema, ROLES, VERDICT_MAIL_MODES, type Role, type User, type VerdictMailMode } from './user';
export { AuditEventSchema, type AuditEvent } from './audit-event';
export { OneTimeLinkSchema, LINK_PURPOSES, type LinkPurpose, type OneTimeLink } from './one-time-link';
export { ApiTokenSchema, SCOPES, type Scope, type ApiToken } from './api-token';
export { SignInAttemptSchema, type SignInAttempt } from './sign-in-attempt';
export { ProductSchema, type Product } from './product';
export { LoopClassSchema, type LoopClass } from './loop-class';
export { RequirementSchema, type Requirement } from './requirement';
export { LoopSchema, type Loop } from './loop';
export { DeviationSchema, type Deviation } from './deviation';
export { TARGET_KEYS, type TargetKey } from './targets';
export { RevisionSchema, REVISION_STATES, type Revision, type RevisionState } from './revision';
export { MarginReportSchema, type MarginReport } from './margin-report';
export { VerdictEventSchema, VERDICT_RANK, type VerdictEvent } from './verdict-event';
export { VerdictDigestSchema, type VerdictDigest } from './verdict-digest';
export { ReportExportSchema, REPORT_STATES, type ReportExport, type ReportState, type FrozenLoopEvidence } from './report-export';
