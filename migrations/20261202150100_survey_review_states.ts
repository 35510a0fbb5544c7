import { sql, type Kysely } from 'kysely';

// Survey states for review and approval: planned → walking → submitted → changes_requested →
// approved → jobs_issued → closed. The old "in_review" is what is now called "submitted".
// Every move is kept in survey_transition (who, when, from, to, the note given).
export async function up(db: Kysely<any>): Promise<void> {
	// Drop the old status check whatever PostgreSQL named it.
	await sql`
		do $$
		declare c record;
		begin
			for c in select conname from pg_constraint
				where conrelid = 'survey'::regclass and contype = 'c' and pg_get_constraintdef(oid) like '%status%'
			loop
				execute format('alter table survey drop constraint %I', c.conname);
			end loop;
		end $$`.execute(db);
	await sql`update survey set status = 'submitted' where status = 'in_review'`.execute(db);
	await sql`alter table survey add constraint survey_status_check
		check (status in ('planned', 'walking', 'submitted', 'changes_requested', 'approved', 'jobs_issued', 'closed'))`.execute(db);

	await db.schema
		.createTable('survey_transition')
		.addColumn('id', 'bigserial', (c) => c.primaryKey())
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('survey_id', 'uuid', (c) => c.notNull())
		.addColumn('transition', 'text', (c) => c.notNull())
		.addColumn('from_status', 'text', (c) => c.notNull())
		.addColumn('to_status', 'text', (c) => c.notNull())
		.addColumn('actor_user_id', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('actor_role', 'text', (c) => c.notNull())
		.addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addForeignKeyConstraint('survey_transition_survey_fk', ['organisation_id', 'survey_id'], 'survey', ['organisation_id', 'id'], (fk) =>
			fk.onDelete('cascade')
		)
		.execute();
	await db.schema.createIndex('survey_transition_survey_idx').on('survey_transition').columns(['survey_id', 'id']).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('survey_transition').ifExists().execute();
	await sql`alter table survey drop constraint if exists survey_status_check`.execute(db);
	await sql`update survey set status = 'in_review' where status in ('submitted', 'changes_requested')`.execute(db);
	await sql`update survey set status = 'approved' where status in ('jobs_issued', 'closed')`.execute(db);
	await sql`alter table survey add constraint survey_status_check check (status in ('planned', 'walking', 'in_review', 'approved'))`.execute(
		db
	);
}
