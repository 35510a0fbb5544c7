// Table types of the integration API: tokens, idempotency records, webhooks and their
// deliveries. Kept apart from types.ts so the feature's tables are in one place; Database
// extends IntegrationTables.
import type { ColumnType, Generated, Selectable } from 'kysely';

type Stamp = ColumnType<Date, Date | string | undefined, Date | string>;
type Json<T = unknown> = ColumnType<T, string | T | undefined, string | T>;

export type TokenKind = 'person' | 'service';
export type TokenScope = 'read' | 'read_write';
export type ServiceRole = 'engineer' | 'technician' | 'viewer';

export interface ApiTokenTable {
	id: Generated<string>;
	organisation_id: string;
	kind: TokenKind;
	user_id: string;
	name: string;
	role: ServiceRole | null;
	scope: TokenScope;
	token_hash: string;
	prefix: string;
	created_by: string | null;
	created_at: Stamp;
	expires_at: Stamp;
	revoked_at: Date | null;
	revoked_by: string | null;
	last_used_at: Date | null;
}

export interface IdempotencyRecordTable {
	organisation_id: string;
	key: string;
	method: string;
	path: string;
	request_hash: string;
	status: 'processing' | 'done';
	response_status: number | null;
	response_headers: Json<Record<string, string>> | null;
	response_body: Uint8Array | null;
	created_at: Stamp;
	completed_at: Date | null;
}

export type WebhookEvent = 'revision.approved' | 'job.issued' | 'job.closed';
export type DeliveryStatus = 'queued' | 'retrying' | 'delivered' | 'failed';

export interface WebhookTable {
	id: Generated<string>;
	organisation_id: string;
	url: string;
	events: WebhookEvent[];
	description: Generated<string>;
	secret: string;
	created_by: string | null;
	created_at: Stamp;
	disabled_at: Date | null;
}

export interface WebhookDeliveryTable {
	id: Generated<string>;
	organisation_id: string;
	webhook_id: string;
	event: WebhookEvent;
	event_id: string;
	body: string;
	status: Generated<DeliveryStatus>;
	attempts: Generated<number>;
	last_status_code: number | null;
	last_error: string | null;
	created_at: Stamp;
	last_attempt_at: Date | null;
	delivered_at: Date | null;
}

export interface IntegrationTables {
	api_token: ApiTokenTable;
	idempotency_record: IdempotencyRecordTable;
	webhook: WebhookTable;
	webhook_delivery: WebhookDeliveryTable;
}

export type ApiToken = Selectable<ApiTokenTable>;
export type Webhook = Selectable<WebhookTable>;
export type WebhookDelivery = Selectable<WebhookDeliveryTable>;
