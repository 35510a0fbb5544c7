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

export interface MailOutboxTable {
	id: Generated<string>;
	organisation_id: string | null;
	to_address: string;
	subject: string;
	body_text: string;
	status: Generated<'queued' | 'sent' | 'failed'>;
	error: string | null;
	attempts: Generated<number>;
	created_at: Generated<Timestamp>;
	sent_at: Timestamp | null;
}

// Each feature adds its tables here (one block per aggregate).
export interface Database {
	organisation: OrganisationTable;
	app_user: AppUserTable;
	member: MemberTable;
	user_session: UserSessionTable;
	invitation: InvitationTable;
	password_reset: PasswordResetTable;
	audit_event: AuditEventTable;
	mail_outbox: MailOutboxTable;
}

export type Organisation = Selectable<OrganisationTable>;
export type AppUser = Selectable<AppUserTable>;
export type Member = Selectable<MemberTable>;
export type NewMember = Insertable<MemberTable>;
export type MemberUpdate = Updateable<MemberTable>;
export type Invitation = Selectable<InvitationTable>;
