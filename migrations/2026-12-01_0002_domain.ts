import { sql, type Kysely } from 'kysely';

// The laboratory's domain: benches, cells, thermometers, resistors, runs and their raw readings,
// events, alerts and the audit trail. Times are UTC milliseconds (INTEGER); JSON lives in TEXT columns.
// Frozen in time: this file takes Kysely<any> and imports no application code.
const statements = [
	`create table bench (
		id integer primary key,
		name text not null unique,
		location text not null default '',
		heat_source_kind text not null check (heat_source_kind in ('furnace','bath','cryostat','ice-bath')),
		heat_source text not null default '',
		bridge text not null default '',
		bridge_channel integer not null default 1 check (bridge_channel between 0 and 63),
		notes text not null default '',
		created_at integer not null,
		retired_at integer
	)`,
	`create table cell (
		id integer primary key,
		serial text not null unique,
		fixed_point text not null check (fixed_point in ('Ar','Hg','TPW','Ga','In','Sn','Zn','Al','Ag')),
		maker text not null default '',
		immersion_depth_mm real not null check (immersion_depth_mm >= 0),
		purity_statement text not null default '',
		purity_percent real check (purity_percent is null or (purity_percent > 90 and purity_percent <= 100)),
		sealed integer not null default 1,
		fill_pressure_pa real,
		notes text not null default '',
		created_at integer not null,
		retired_at integer
	)`,
	`create table thermometer (
		id integer primary key,
		serial text not null unique,
		kind text not null default 'SPRT' check (kind in ('SPRT','HTSPRT','CSPRT')),
		maker text not null default '',
		nominal_ohm real not null check (nominal_ohm > 0),
		notes text not null default '',
		created_at integer not null,
		retired_at integer
	)`,
	`create table thermometer_rtpw (
		id integer primary key,
		thermometer_id integer not null references thermometer(id) on delete cascade,
		measured_at integer not null,
		r_tpw_ohm real not null check (r_tpw_ohm > 0),
		current_ma real,
		run_id integer references run(id) on delete set null,
		source text not null default 'entered' check (source in ('entered','run','import')),
		note text not null default '',
		created_by text references "user"(id) on delete set null,
		created_at integer not null
	)`,
	`create index thermometer_rtpw_by_time on thermometer_rtpw (thermometer_id, measured_at)`,
	`create table calibration (
		id integer primary key,
		thermometer_id integer not null references thermometer(id) on delete cascade,
		version integer not null,
		subrange text not null,
		coefficients_json text not null,
		r_tpw_ohm real not null,
		runs_json text not null default '[]',
		uncertainty_json text not null default '{}',
		status text not null default 'current' check (status in ('current','superseded')),
		notes text not null default '',
		created_by text references "user"(id) on delete set null,
		created_at integer not null,
		unique (thermometer_id, version)
	)`,
	`create table standard_resistor (
		id integer primary key,
		serial text not null unique,
		nominal_ohm real not null check (nominal_ohm > 0),
		calibrated_ohm real not null check (calibrated_ohm > 0),
		calibrated_at integer,
		reference_temperature_c real not null default 20,
		alpha_per_k real not null default 0,
		beta_per_k2 real not null default 0,
		bath_temperature_c real not null default 20,
		notes text not null default '',
		created_at integer not null,
		retired_at integer
	)`,
	`create table run (
		id integer primary key,
		bench_id integer not null references bench(id),
		cell_id integer not null references cell(id),
		thermometer_id integer not null references thermometer(id),
		resistor_id integer not null references standard_resistor(id),
		fixed_point text not null check (fixed_point in ('Ar','Hg','TPW','Ga','In','Sn','Zn','Al','Ag')),
		kind text not null check (kind in ('melt','freeze','triple-point')),
		state text not null default 'setup' check (state in ('setup','recording','finished','abandoned')),
		review_state text not null default 'unreviewed' check (review_state in ('unreviewed','signed','returned')),
		operator_id text references "user"(id) on delete set null,
		created_by text references "user"(id) on delete set null,
		created_at integer not null,
		started_at integer,
		ended_at integer,
		sensor_depth_m real not null default 0,
		gas_pressure_pa real not null default 101325,
		settings_json text not null default '{}',
		analysis_json text,
		notes text not null default '',
		revision integer not null default 1,
		signed_by text references "user"(id) on delete set null,
		signed_at integer,
		reading_count integer not null default 0,
		highest_seq integer not null default -1,
		last_reading_at integer
	)`,
	`create index run_by_bench on run (bench_id, created_at)`,
	`create index run_by_cell on run (cell_id, created_at)`,
	`create index run_by_thermometer on run (thermometer_id, created_at)`,
	`create index run_by_state on run (state)`,
	// One run may be recording per bench at a time: the bench token posts to "its" run.
	`create unique index run_one_recording_per_bench on run (bench_id) where state = 'recording'`,
	// Raw bridge readings exactly as received. Lean on purpose (10^5..10^6 rows a run):
	// keyed by (run, seq) without a rowid, so the key is the storage order and a duplicate seq is refused.
	`create table reading (
		run_id integer not null references run(id) on delete cascade,
		seq integer not null,
		time_ms integer not null,
		ratio real not null,
		current_ma real not null,
		channel integer not null,
		primary key (run_id, seq)
	) without rowid`,
	`create table run_event (
		id integer primary key,
		run_id integer not null references run(id) on delete cascade,
		time_ms integer not null,
		kind text not null,
		note text not null default '',
		created_by text references "user"(id) on delete set null,
		created_at integer not null
	)`,
	`create index run_event_by_run on run_event (run_id, time_ms)`,
	`create table bench_token (
		id integer primary key,
		bench_id integer not null references bench(id) on delete cascade,
		label text not null default '',
		token_hash text not null unique,
		token_hint text not null,
		created_by text references "user"(id) on delete set null,
		created_at integer not null,
		last_used_at integer,
		revoked_at integer
	)`,
	`create table alert_rule (
		id integer primary key,
		kind text not null check (kind in ('drift','band','noise','silence','rtpw-shift','early-end')),
		fixed_point text check (fixed_point is null or fixed_point in ('Ar','Hg','TPW','Ga','In','Sn','Zn','Al','Ag')),
		run_id integer references run(id) on delete cascade,
		params_json text not null default '{}',
		enabled integer not null default 1,
		created_by text references "user"(id) on delete set null,
		created_at integer not null,
		updated_at integer not null
	)`,
	`create table alert_event (
		id integer primary key,
		rule_id integer references alert_rule(id) on delete set null,
		run_id integer references run(id) on delete cascade,
		bench_id integer references bench(id) on delete set null,
		kind text not null,
		state text not null,
		message text not null,
		value real,
		limit_value real,
		unit text not null default '',
		raised_at integer not null,
		last_seen_at integer not null,
		occurrences integer not null default 1,
		acknowledged_by text references "user"(id) on delete set null,
		acknowledged_at integer,
		ack_comment text,
		resolved_by text references "user"(id) on delete set null,
		resolved_at integer,
		escalated_at integer
	)`,
	`create index alert_event_by_state on alert_event (state, raised_at)`,
	`create index alert_event_by_run on alert_event (run_id)`,
	`create table audit_log (
		id integer primary key autoincrement,
		at integer not null,
		actor_id text,
		actor_label text not null,
		action text not null,
		object_type text not null,
		object_id text not null,
		summary text not null,
		details_json text not null default '{}'
	)`,
	`create index audit_log_by_object on audit_log (object_type, object_id, at)`,
	`create index audit_log_by_time on audit_log (at)`,
	// The audit trail is append-only: the database itself refuses edits and deletions.
	`create trigger audit_log_no_update before update on audit_log begin select raise(abort, 'audit_log is append-only'); end`,
	`create trigger audit_log_no_delete before delete on audit_log begin select raise(abort, 'audit_log is append-only'); end`,
	`create table lab_setting (
		key text primary key,
		value_json text not null
	)`
];

export async function up(db: Kysely<any>): Promise<void> {
	for (const statement of statements) await sql.raw(statement).execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of ['lab_setting', 'audit_log', 'alert_event', 'alert_rule', 'bench_token', 'run_event', 'reading', 'run', 'standard_resistor', 'calibration', 'thermometer_rtpw', 'thermometer', 'cell', 'bench']) {
		await sql.raw(`drop table if exists ${t}`).execute(db);
	}
}
