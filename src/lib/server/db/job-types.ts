// Table types of installation jobs: the job (a group of approved revision points with an
// assignee, an outage window and a due date) and its points with the as-installed record.
import type { ColumnType, Generated, Selectable } from 'kysely';

type Stamp = ColumnType<Date, Date | string | undefined, Date | string>;
type Json<T = unknown> = ColumnType<T, string | T | undefined, string | T>;

export type JobStatus = 'issued' | 'closed';

export interface InstallationJobTable {
	id: Generated<string>;
	organisation_id: string;
	survey_id: string;
	revision_id: string;
	/** Per organisation, shown as J-0001. */
	number: number;
	title: string;
	status: Generated<JobStatus>;
	assignee_user_id: string | null;
	outage_start: ColumnType<Date | null, Date | string | null | undefined, Date | string | null>;
	outage_end: ColumnType<Date | null, Date | string | null | undefined, Date | string | null>;
	/** date: pg reads it back as a Date at local midnight; see dateText() in db/jobs.ts. */
	due_date: ColumnType<Date | string | null, string | null | undefined, string | null>;
	lockout_required: boolean;
	notes: Generated<string>;
	issued_by: string | null;
	issued_at: Stamp;
	closed_by: string | null;
	closed_at: Date | null;
	close_note: Generated<string>;
	updated_at: Stamp;
}

export interface JobPointTable {
	id: Generated<string>;
	organisation_id: string;
	job_id: string;
	revision_board_id: string;
	point_id: string;
	/** The number the point carries in its job (board image, pack, exports). */
	number: number;
	mounting_used: 'stud' | 'bonded_pad' | 'magnet' | null;
	torque_nm: number | null;
	supply_v: number | null;
	polarity_ok: boolean | null;
	photo_media_id: string | null;
	ready_at: Date | null;
	baseline_start_at: Date | null;
	deviation: Generated<string>;
	deviation_reason: Generated<string>;
	findings: Json<unknown[]>;
	worst: 'pass' | 'warn' | 'fail' | null;
	recorded_by: string | null;
	recorded_at: Date | null;
	/** The device's key for one recording, so a record sent twice (offline retry) is stored once. */
	record_key: string | null;
}

export interface JobTables {
	installation_job: InstallationJobTable;
	job_point: JobPointTable;
}

export type InstallationJobRow = Selectable<InstallationJobTable>;
export type JobPointRow = Selectable<JobPointTable>;
