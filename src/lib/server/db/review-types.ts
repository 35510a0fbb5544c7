// Table types of review and approval: survey transitions (the audit trail of status moves),
// comments with mentions, and approved revisions stored as rows. Kept apart from types.ts so
// the feature's tables are in one place; Database extends ReviewTables.
import type { ColumnType, Generated, Selectable } from 'kysely';
import type { Role } from './types';
import type { SurveyStatus, TransitionName } from '../../survey/states';

type Stamp = ColumnType<Date, Date | string | undefined, Date | string>;
type Json<T = unknown> = ColumnType<T, string | T | undefined, string | T>;

export interface SurveyTransitionTable {
	/** bigserial: comes back as a string. */
	id: Generated<string>;
	organisation_id: string;
	survey_id: string;
	transition: TransitionName;
	from_status: SurveyStatus;
	to_status: SurveyStatus;
	actor_user_id: string | null;
	actor_role: Role;
	note: Generated<string>;
	created_at: Stamp;
}

export type CommentTargetKind = 'survey' | 'board' | 'point' | 'route';

export interface CommentTable {
	id: Generated<string>;
	organisation_id: string;
	survey_id: string;
	/** The board of a board, point or route comment; null for the survey's. */
	board_id: string | null;
	target_kind: CommentTargetKind;
	/** The Yjs item id of a point or route; null for survey and board comments. */
	target_id: string | null;
	/** The thread's first comment; null for a thread's start. */
	parent_id: string | null;
	author_user_id: string | null;
	body: string;
	created_at: Stamp;
	edited_at: Date | null;
}

export interface CommentMentionTable {
	comment_id: string;
	organisation_id: string;
	user_id: string;
	/** When the e-mail went to the outbox; null until then. */
	notified_at: Date | null;
	created_at: Stamp;
}

export interface SurveyRevisionTable {
	id: Generated<string>;
	organisation_id: string;
	survey_id: string;
	number: number;
	approved_by: string | null;
	approved_at: Stamp;
	note: Generated<string>;
	/** Rejected or undecided points the approver confirmed; null when there were none. */
	confirmed_exceptions: Json<RevisionException[]> | null;
}

export interface RevisionException {
	boardId: string;
	pointId: string;
	label: string;
	status: string;
}

export interface RevisionBoardTable {
	id: Generated<string>;
	revision_id: string;
	board_id: string;
	machine_id: string;
	media_id: string | null;
	title: string;
	/** sha256 (hex) of the board's Yjs state vector at approval. */
	state_vector_sha256: string;
	scale_ax: number | null;
	scale_ay: number | null;
	scale_bx: number | null;
	scale_by: number | null;
	scale_length_mm: number | null;
}

export interface RevisionPointTable {
	revision_board_id: string;
	revision_id: string;
	point_id: string;
	label: string;
	component: string;
	x: number;
	y: number;
	status: string;
	/** approved, flagged or rejected; null while undecided (proposed). */
	decision: string | null;
	decision_reason: string | null;
	direction: string | null;
	surface: string | null;
	mounting: string | null;
	material: string | null;
	flat_diameter_mm: number | null;
	wall_thickness_mm: number | null;
	distance_to_bearing_mm: number | null;
	/** The distance the checks used and where it came from ('entered' or 'measured'). */
	distance_used_mm: number | null;
	distance_source: string | null;
	surface_temp_c: number | null;
	notes: string;
	created_by: string;
	/** Every field of the point as stored in the board document. */
	fields: Json<Record<string, unknown>>;
	findings: Json<unknown[]>;
	worst: string;
}

export interface RevisionRouteTable {
	revision_board_id: string;
	revision_id: string;
	route_id: string;
	point_id: string;
	supply_point_id: string | null;
	exit_label: string;
	vertices: Json<Array<[number, number]>>;
	/** The length the checks used, m, and how it was measured ('entered', 'scale' or null). */
	length_m: number | null;
	length_source: string | null;
	photo_length_m: number | null;
	cross_section_mm2: number | null;
	fixings: string | null;
	supply_v: number | null;
	notes: string;
	fields: Json<Record<string, unknown>>;
	findings: Json<unknown[]>;
	worst: string;
}

export interface RevisionZoneTable {
	revision_board_id: string;
	revision_id: string;
	zone_id: string;
	label: string;
	kind: string;
	polygon: Json<Array<[number, number]>>;
	fields: Json<Record<string, unknown>>;
}

export interface ReviewTables {
	survey_transition: SurveyTransitionTable;
	comment: CommentTable;
	comment_mention: CommentMentionTable;
	survey_revision: SurveyRevisionTable;
	revision_board: RevisionBoardTable;
	revision_point: RevisionPointTable;
	revision_route: RevisionRouteTable;
	revision_zone: RevisionZoneTable;
}

export type SurveyTransitionRow = Selectable<SurveyTransitionTable>;
export type CommentRow = Selectable<CommentTable>;
export type SurveyRevisionRow = Selectable<SurveyRevisionTable>;
export type RevisionPointRow = Selectable<RevisionPointTable>;
export type RevisionRouteRow = Selectable<RevisionRouteTable>;
