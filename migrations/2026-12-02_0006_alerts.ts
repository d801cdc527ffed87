import { sql, type Kysely } from 'kysely';

// Alerts (issue 8): de-duplication key on alert events, the e-mail outbox, the on-duty lists and the
// sign-off record of runs (every decision on every revision, kept, never overwritten).
// Frozen in time: this file takes Kysely<any> and imports no application code.
const statements = [
	// One open alert per (run, rule kind): a condition that comes back reopens the same row.
	`alter table alert_event add column dedupe_key text not null default ''`,
	`alter table alert_event add column cleared_by_condition integer not null default 0`,
	`alter table alert_event add column reopened_at integer`,
	`create index alert_event_by_key on alert_event (dedupe_key, raised_at)`,
	`create table alert_delivery (
		id integer primary key,
		alert_id integer not null references alert_event(id) on delete cascade,
		reason text not null check (reason in ('raised','reopened','escalated')),
		recipients_json text not null,
		subject text not null,
		body_text text not null,
		state text not null default 'pending' check (state in ('pending','sent','failed')),
		attempts integer not null default 0,
		next_attempt_at integer not null,
		last_error text,
		message_id text,
		created_at integer not null,
		sent_at integer
	)`,
	`create index alert_delivery_due on alert_delivery (state, next_attempt_at)`,
	`create index alert_delivery_by_alert on alert_delivery (alert_id)`,
	`create table alert_duty (
		user_id text not null references "user"(id) on delete cascade,
		tier text not null check (tier in ('first','second')),
		added_by text references "user"(id) on delete set null,
		added_at integer not null,
		primary key (user_id, tier)
	)`,
	`create table run_review (
		id integer primary key,
		run_id integer not null references run(id) on delete cascade,
		revision integer not null,
		decision text not null check (decision in ('signed','returned','revised')),
		comment text not null default '',
		snapshot_json text not null default '{}',
		decided_by text references "user"(id) on delete set null,
		decided_at integer not null
	)`,
	`create index run_review_by_run on run_review (run_id, id)`,
	// A decision once recorded stays as it was.
	`create trigger run_review_no_update before update on run_review begin select raise(abort, 'run_review is append-only'); end`,
	// A signed run is locked: its events cannot be added, changed or removed (the app says so first).
	`create trigger run_event_locked_insert before insert on run_event when (select review_state from run where id = new.run_id) = 'signed' begin select raise(abort, 'run is signed off and locked'); end`,
	`create trigger run_event_locked_update before update on run_event when (select review_state from run where id = old.run_id) = 'signed' begin select raise(abort, 'run is signed off and locked'); end`,
	`create trigger run_event_locked_delete before delete on run_event when (select review_state from run where id = old.run_id) = 'signed' begin select raise(abort, 'run is signed off and locked'); end`
];

export async function up(db: Kysely<any>): Promise<void> {
	for (const s of statements) await sql.raw(s).execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of ['run_event_locked_insert', 'run_event_locked_update', 'run_event_locked_delete', 'run_review_no_update']) await sql.raw(`drop trigger if exists ${t}`).execute(db);
	for (const t of ['run_review', 'alert_duty', 'alert_delivery']) await sql.raw(`drop table if exists ${t}`).execute(db);
	await sql.raw('drop index if exists alert_event_by_key').execute(db);
	for (const c of ['reopened_at', 'cleared_by_condition', 'dedupe_key']) await sql.raw(`alter table alert_event drop column ${c}`).execute(db);
}
