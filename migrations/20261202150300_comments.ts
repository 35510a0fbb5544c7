import { sql, type Kysely } from 'kysely';

// Comments on a survey, a board, or a point or route of a board (by its Yjs item id), in
// threads (replies point at the thread's first comment). A mention of a member is a row in
// comment_mention; its primary key makes sure each member is told once per comment.
export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('comment')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('survey_id', 'uuid', (c) => c.notNull())
		.addColumn('board_id', 'uuid')
		.addColumn('target_kind', 'text', (c) => c.notNull().check(sql`target_kind in ('survey', 'board', 'point', 'route')`))
		.addColumn('target_id', 'text')
		.addColumn('parent_id', 'uuid', (c) => c.references('comment.id').onDelete('cascade'))
		.addColumn('author_user_id', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('body', 'text', (c) => c.notNull().check(sql`char_length(body) between 1 and 4000`))
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('edited_at', 'timestamptz')
		.addForeignKeyConstraint('comment_survey_fk', ['organisation_id', 'survey_id'], 'survey', ['organisation_id', 'id'], (fk) =>
			fk.onDelete('cascade')
		)
		.addForeignKeyConstraint('comment_board_fk', ['organisation_id', 'board_id'], 'board', ['organisation_id', 'id'], (fk) =>
			fk.onDelete('cascade')
		)
		.addCheckConstraint(
			'comment_target_check',
			sql`(target_kind = 'survey' and board_id is null and target_id is null)
				or (target_kind = 'board' and board_id is not null and target_id is null)
				or (target_kind in ('point', 'route') and board_id is not null and target_id is not null and char_length(target_id) between 1 and 100)`
		)
		.execute();
	await db.schema.createIndex('comment_survey_idx').on('comment').columns(['organisation_id', 'survey_id', 'created_at']).execute();
	await db.schema.createIndex('comment_parent_idx').on('comment').column('parent_id').execute();

	await db.schema
		.createTable('comment_mention')
		.addColumn('comment_id', 'uuid', (c) => c.notNull().references('comment.id').onDelete('cascade'))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('user_id', 'text', (c) => c.notNull().references('app_user.id').onDelete('cascade'))
		.addColumn('notified_at', 'timestamptz')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addPrimaryKeyConstraint('comment_mention_pkey', ['comment_id', 'user_id'])
		.execute();
	await db.schema
		.createIndex('comment_mention_user_idx')
		.on('comment_mention')
		.columns(['organisation_id', 'user_id', 'created_at'])
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('comment_mention').ifExists().execute();
	await db.schema.dropTable('comment').ifExists().execute();
}
