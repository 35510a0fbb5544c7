import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely';

export type Role = 'admin' | 'engineer' | 'technician' | 'viewer';
type Timestamp = ColumnType<Date, Date | string | undefined, Date | string>;
type Json<T = unknown> = ColumnType<T, string | T | undefined, string | T>;

export interface OrganisationTable {
	id: Generated<string>;
	name: string;
	settings: Json<Record<string, unknown>>;
	created_at: Generated<Timestamp>;
}

export interface AppUserTable {
	id: string;
	email: string;
	name: string;
	password_hash: string;
	created_at: Generated<Timestamp>;
}

export interface MemberTable {
	id: Generated<string>;
	organisation_id: string;
	user_id: string;
	role: Role;
	created_at: Generated<Timestamp>;
}

export interface UserSessionTable {
	id: string;
	user_id: string;
	expires_at: Timestamp;
	organisation_id: string;
}

export interface InvitationTable {
	id: Generated<string>;
	organisation_id: string;
	email: string;
	role: Role;
	token_hash: string;
	invited_by: string | null;
	expires_at: Timestamp;
	accepted_at: Timestamp | null;
	revoked_at: Timestamp | null;
	created_at: Generated<Timestamp>;
}

export interface PasswordResetTable {
	id: Generated<string>;
	user_id: string;
	token_hash: string;
	expires_at: Timestamp;
	used_at: Timestamp | null;
	created_at: Generated<Timestamp>;
}

export interface AuditEventTable {
	id: Generated<string>;
	organisation_id: string | null;
	actor_user_id: string | null;
	action: string;
	subject_type: string | null;
	subject_id: string | null;
	data: Json<Record<string, unknown>>;
	created_at: Generated<Timestamp>;
}

/** 'recipient': only the mailbox owner may see it; 'organisation': the sending organisation's outbox lists it. */
export type MailAudience = 'recipient' | 'organisation';
export type MailPurpose =
	'invitation' | 'password-reset' | 'reset-no-account' | 'sign-up' | 'sign-up-existing' | 'mention' | 'job-assigned' | 'other';

export interface MailOutboxTable {
	id: Generated<string>;
	/** The organisation whose action sent the message; null for personal mail. */
	organisation_id: string | null;
	audience: Generated<MailAudience>;
	purpose: Generated<MailPurpose>;
	to_address: string;
	subject: string;
	body_text: string;
	status: Generated<'queued' | 'sending' | 'sent' | 'failed'>;
	error: string | null;
	attempts: Generated<number>;
	created_at: Timestamp;
	sent_at: Timestamp | null;
	next_attempt_at: Timestamp;
	claimed_at: Timestamp | null;
}

export interface SignUpRequestTable {
	id: Generated<string>;
	email: string;
	name: string;
	organisation_name: string;
	password_hash: string;
	token_hash: string;
	expires_at: Timestamp;
	used_at: Timestamp | null;
	created_at: Generated<Timestamp>;
}

export interface RateLimitTable {
	key: string;
	points: Generated<number>;
	expire: ColumnType<string | null, number | null, number | null>;
}

// --- Register: sites, areas, supply points, machines, bearings, media ---
export type MachineKind = 'motor' | 'pump' | 'fan' | 'compressor' | 'gearbox' | 'blower' | 'other';
export type SpeedMode = 'constant' | 'variable';
export type Foundation = 'rigid' | 'flexible';
export type BearingPosition = 'drive_end' | 'non_drive_end';
export type MediaKind = 'photo' | 'drawing';
/** Set by the database on insert (default now()); never null. */
type Stamp = ColumnType<Date, Date | string | undefined, Date | string>;
/** archived_at: null while the row is live. */
type ArchivedAt = ColumnType<Date | null, Date | string | null | undefined, Date | string | null>;

export interface SiteTable {
	id: Generated<string>;
	organisation_id: string;
	name: string;
	code: string | null;
	address: Generated<string>;
	notes: Generated<string>;
	archived_at: ArchivedAt;
	created_at: Stamp;
	updated_at: Stamp;
}

export interface AreaTable {
	id: Generated<string>;
	organisation_id: string;
	site_id: string;
	name: string;
	notes: Generated<string>;
	archived_at: ArchivedAt;
	created_at: Stamp;
	updated_at: Stamp;
}

export interface SupplyPointTable {
	id: Generated<string>;
	organisation_id: string;
	area_id: string;
	name: string;
	tag: string | null;
	voltage_v: Generated<number>;
	max_current_a: number | null;
	location_note: Generated<string>;
	archived_at: ArchivedAt;
	created_at: Stamp;
	updated_at: Stamp;
}

export interface MachineTable {
	id: Generated<string>;
	organisation_id: string;
	site_id: string;
	area_id: string | null;
	name: string;
	tag: string | null;
	kind: MachineKind;
	speed_rpm: number | null;
	speed_mode: Generated<SpeedMode>;
	speed_signal: Generated<boolean>;
	power_kw: number | null;
	foundation: Foundation | null;
	hazardous_area: Generated<boolean>;
	hazardous_zone_note: Generated<string>;
	notes: Generated<string>;
	archived_at: ArchivedAt;
	created_at: Stamp;
	updated_at: Stamp;
}

export interface BearingTable {
	id: Generated<string>;
	organisation_id: string;
	machine_id: string;
	position: BearingPosition;
	component: Generated<string>;
	designation: Generated<string>;
	rolling_elements: number | null;
	rolling_element_d_mm: number | null;
	pitch_d_mm: number | null;
	contact_angle_deg: Generated<number>;
	notes: Generated<string>;
	archived_at: ArchivedAt;
	created_at: Stamp;
	updated_at: Stamp;
}

export interface MediaTable {
	id: Generated<string>;
	organisation_id: string;
	machine_id: string;
	kind: MediaKind;
	caption: Generated<string>;
	original_filename: string;
	/** type of the uploaded file, read from its bytes */
	mime_type: string;
	display_mime_type: string;
	thumb_mime_type: string;
	/** size of the display image */
	width: number;
	height: number;
	thumb_width: number;
	thumb_height: number;
	original_bytes: number;
	display_bytes: number;
	thumb_bytes: number;
	original_key: string;
	display_key: string;
	thumb_key: string;
	sha256: string;
	etag: string;
	uploaded_by: string | null;
	archived_at: ArchivedAt;
	created_at: Stamp;
	updated_at: Stamp;
}

// Surveys and live boards (migration 20261201110000_surveys).
export type { SurveyStatus } from '../../survey/states';
import type { SurveyStatus } from '../../survey/states';
import type { ReviewTables } from './review-types';
import type { JobTables } from './job-types';
export type SurveyAssigneeRole = 'engineer' | 'technician';
/** bigint columns come back as strings (pg does not narrow them to number); optional on insert. */
type Bigint = ColumnType<string, string | number | bigint | undefined, string | number | bigint>;
type Bytes = ColumnType<Buffer, Buffer | Uint8Array, Buffer | Uint8Array>;

export interface SurveyTable {
	id: Generated<string>;
	organisation_id: string;
	site_id: string;
	title: string;
	status: Generated<SurveyStatus>;
	/** A calendar date; the repository reads it back as 'YYYY-MM-DD'. */
	planned_date: ColumnType<Date | string | null, string | null | undefined, string | null>;
	notes: Generated<string>;
	created_by: string | null;
	approved_at: Timestamp | null;
	approved_by: string | null;
	archived_at: ArchivedAt;
	created_at: Stamp;
	updated_at: Stamp;
}

export interface SurveyMachineTable {
	organisation_id: string;
	survey_id: string;
	machine_id: string;
	position: Generated<number>;
}

export interface SurveyAssigneeTable {
	survey_id: string;
	user_id: string;
	role: SurveyAssigneeRole;
	created_at: Stamp;
}

export interface BoardTable {
	id: Generated<string>;
	organisation_id: string;
	survey_id: string;
	machine_id: string;
	media_id: string | null;
	title: string;
	frozen_at: Timestamp | null;
	snapshot: ColumnType<Buffer | null, Buffer | Uint8Array | null | undefined, Buffer | Uint8Array | null>;
	snapshot_seq: Bigint;
	created_at: Stamp;
}

export interface BoardUpdateTable {
	seq: Bigint;
	board_id: string;
	update: Bytes;
	user_id: string | null;
	created_at: Stamp;
}

// Each feature adds its tables here (one block per aggregate).
/** The member who introduced a Yjs client id on a board; only they may write under it. */
export interface BoardClientTable {
	board_id: string;
	client_id: Bigint;
	user_id: string;
	claimed_at: Generated<Date>;
}

export interface Database extends ReviewTables, JobTables {
	organisation: OrganisationTable;
	app_user: AppUserTable;
	member: MemberTable;
	user_session: UserSessionTable;
	invitation: InvitationTable;
	password_reset: PasswordResetTable;
	audit_event: AuditEventTable;
	mail_outbox: MailOutboxTable;
	sign_up_request: SignUpRequestTable;
	rate_limit: RateLimitTable;
	site: SiteTable;
	area: AreaTable;
	supply_point: SupplyPointTable;
	machine: MachineTable;
	bearing: BearingTable;
	media: MediaTable;
	survey: SurveyTable;
	survey_machine: SurveyMachineTable;
	survey_assignee: SurveyAssigneeTable;
	board: BoardTable;
	board_update: BoardUpdateTable;
	board_client: BoardClientTable;
}

export type Organisation = Selectable<OrganisationTable>;
export type AppUser = Selectable<AppUserTable>;
export type Member = Selectable<MemberTable>;
export type NewMember = Insertable<MemberTable>;
export type MemberUpdate = Updateable<MemberTable>;
export type Invitation = Selectable<InvitationTable>;
export type Site = Selectable<SiteTable>;
export type Area = Selectable<AreaTable>;
export type SupplyPoint = Selectable<SupplyPointTable>;
export type Machine = Selectable<MachineTable>;
export type Bearing = Selectable<BearingTable>;
export type Media = Selectable<MediaTable>;
export type Survey = Selectable<SurveyTable>;
export type Board = Selectable<BoardTable>;
