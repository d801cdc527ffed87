import { sql, type Kysely } from 'kysely';

// Documents attached to cells and thermometers (assays, certificates), and the staging area of file
// uploads (a spooled file, then the parsed rows of a past run waiting for the person to confirm).
// Frozen in time: this file takes Kysely<any> and imports no application code.
const statements = [
	// PDFs are small (10 MiB at most) and few: kept in the database, so one backup holds them, the row and
	// its audit entry commit together, and no path on disk is ever built from user input.
	`create table document (
		id integer primary key,
		owner_type text not null check (owner_type in ('cell','thermometer')),
		owner_id integer not null,
		kind text not null default 'other' check (kind in ('assay','certificate','other')),
		title text not null default '',
		filename text not null,
		content_type text not null,
		size_bytes integer not null check (size_bytes > 0),
		sha256 text not null,
		content blob not null,
		uploaded_by text references "user"(id) on delete set null,
		uploaded_at integer not null
	)`,
	`create index document_by_owner on document (owner_type, owner_id, uploaded_at)`,
	// One upload: its bytes arrive in chunks into a spool file under the data folder, then are parsed.
	`create table upload (
		id text primary key,
		purpose text not null check (purpose in ('run-log','document')),
		state text not null check (state in ('receiving','received','parsing','parsed','failed','confirmed','discarded')),
		filename text not null,
		size_bytes integer not null check (size_bytes >= 0),
		received_bytes integer not null default 0,
		parsed_bytes integer not null default 0,
		mapping_json text not null default '{}',
		good_rows integer not null default 0,
		bad_rows integer not null default 0,
		first_time_ms integer,
		last_time_ms integer,
		message text not null default '',
		run_id integer references run(id) on delete set null,
		created_by text references "user"(id) on delete set null,
		created_at integer not null,
		updated_at integer not null
	)`,
	`create index upload_by_time on upload (updated_at)`,
	// Parsed good rows of a run-log upload, moved into reading on confirm. Keyed like reading itself.
	`create table upload_row (
		upload_id text not null references upload(id) on delete cascade,
		seq integer not null,
		line integer not null,
		time_ms integer not null,
		ratio real not null,
		current_ma real not null,
		channel integer not null,
		primary key (upload_id, seq)
	) without rowid`,
	// Bad rows: line in the file (1 = first line), column, reason. Capped per upload; all are counted.
	`create table upload_problem (
		upload_id text not null references upload(id) on delete cascade,
		line integer not null,
		field text not null,
		reason text not null
	)`,
	`create index upload_problem_by_upload on upload_problem (upload_id, line)`
];

export async function up(db: Kysely<any>): Promise<void> {
	for (const statement of statements) await sql.raw(statement).execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of ['upload_problem', 'upload_row', 'upload', 'document']) await sql.raw(`drop table if exists ${t}`).execute(db);
}
