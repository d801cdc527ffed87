import type { Generated, Insertable, Selectable, Updateable } from 'kysely';

// One interface per table; nullable columns are `T | null`. Times are UTC milliseconds.
// better-auth's own tables (user, session, account, verification, rateLimit) are typed only as far as
// the app reads them.

export type FixedPointCode = 'Ar' | 'Hg' | 'TPW' | 'Ga' | 'In' | 'Sn' | 'Zn' | 'Al' | 'Ag';
export type RunKind = 'melt' | 'freeze' | 'triple-point';
export type RunState = 'setup' | 'recording' | 'finished' | 'abandoned';
export type ReviewState = 'unreviewed' | 'signed' | 'returned';

export interface UserTable {
	id: string;
	name: string;
	email: string;
	emailVerified: number;
	image: string | null;
	createdAt: string;
	updatedAt: string;
	role: string | null;
	banned: number | null;
	banReason: string | null;
	banExpires: string | null;
}

export interface SessionTable {
	id: string;
	expiresAt: string;
	token: string;
	userId: string;
	createdAt: string;
	updatedAt: string;
	ipAddress: string | null;
	userAgent: string | null;
	impersonatedBy: string | null;
}

export interface BenchTable {
	id: Generated<number>;
	name: string;
	location: Generated<string>;
	heat_source_kind: 'furnace' | 'bath' | 'cryostat' | 'ice-bath';
	heat_source: Generated<string>;
	bridge: Generated<string>;
	bridge_channel: Generated<number>;
	notes: Generated<string>;
	created_at: number;
	retired_at: number | null;
}

export interface CellTable {
	id: Generated<number>;
	serial: string;
	fixed_point: FixedPointCode;
	maker: Generated<string>;
	immersion_depth_mm: number;
	purity_statement: Generated<string>;
	purity_percent: number | null;
	sealed: Generated<number>;
	fill_pressure_pa: number | null;
	notes: Generated<string>;
	created_at: number;
	retired_at: number | null;
}

export interface ThermometerTable {
	id: Generated<number>;
	serial: string;
	kind: Generated<'SPRT' | 'HTSPRT' | 'CSPRT'>;
	maker: Generated<string>;
	nominal_ohm: number;
	notes: Generated<string>;
	created_at: number;
	retired_at: number | null;
}

export interface ThermometerRtpwTable {
	id: Generated<number>;
	thermometer_id: number;
	measured_at: number;
	r_tpw_ohm: number;
	current_ma: number | null;
	run_id: number | null;
	source: Generated<'entered' | 'run' | 'import'>;
	note: Generated<string>;
	created_by: string | null;
	created_at: number;
}

export interface CalibrationTable {
	id: Generated<number>;
	thermometer_id: number;
	version: number;
	subrange: string;
	coefficients_json: string;
	r_tpw_ohm: number;
	runs_json: Generated<string>;
	uncertainty_json: Generated<string>;
	status: Generated<'current' | 'superseded'>;
	notes: Generated<string>;
	created_by: string | null;
	created_at: number;
}

export interface StandardResistorTable {
	id: Generated<number>;
	serial: string;
	nominal_ohm: number;
	calibrated_ohm: number;
	calibrated_at: number | null;
	reference_temperature_c: Generated<number>;
	alpha_per_k: Generated<number>;
	beta_per_k2: Generated<number>;
	bath_temperature_c: Generated<number>;
	notes: Generated<string>;
	created_at: number;
	retired_at: number | null;
}

export interface RunTable {
	id: Generated<number>;
	bench_id: number;
	cell_id: number;
	thermometer_id: number;
	resistor_id: number;
	fixed_point: FixedPointCode;
	kind: RunKind;
	state: Generated<RunState>;
	review_state: Generated<ReviewState>;
	operator_id: string | null;
	created_by: string | null;
	created_at: number;
	started_at: number | null;
	ended_at: number | null;
	sensor_depth_m: Generated<number>;
	gas_pressure_pa: Generated<number>;
	settings_json: Generated<string>;
	analysis_json: string | null;
	notes: Generated<string>;
	revision: Generated<number>;
	signed_by: string | null;
	signed_at: number | null;
	reading_count: Generated<number>;
	highest_seq: Generated<number>;
	last_reading_at: number | null;
}

/** A raw bridge reading exactly as the instrument sent it. */
export interface ReadingTable {
	run_id: number;
	seq: number;
	time_ms: number;
	ratio: number;
	current_ma: number;
	channel: number;
}

export interface RunEventTable {
	id: Generated<number>;
	run_id: number;
	time_ms: number;
	kind: string;
	note: Generated<string>;
	/** 'immersion-step' events: sensor mid-point below the free surface after the step, m (migration 0005) */
	depth_m: number | null;
	created_by: string | null;
	created_at: number;
}

export interface BenchTokenTable {
	id: Generated<number>;
	bench_id: number;
	label: Generated<string>;
	token_hash: string;
	token_hint: string;
	created_by: string | null;
	created_at: number;
	last_used_at: number | null;
	revoked_at: number | null;
}

export interface AlertRuleTable {
	id: Generated<number>;
	kind: 'drift' | 'band' | 'noise' | 'silence' | 'rtpw-shift' | 'early-end';
	fixed_point: FixedPointCode | null;
	run_id: number | null;
	params_json: Generated<string>;
	enabled: Generated<number>;
	created_by: string | null;
	created_at: number;
	updated_at: number;
}

export interface AlertEventTable {
	id: Generated<number>;
	rule_id: number | null;
	run_id: number | null;
	bench_id: number | null;
	kind: string;
	state: string;
	message: string;
	value: number | null;
	limit_value: number | null;
	unit: Generated<string>;
	raised_at: number;
	last_seen_at: number;
	occurrences: Generated<number>;
	acknowledged_by: string | null;
	acknowledged_at: number | null;
	ack_comment: string | null;
	resolved_by: string | null;
	resolved_at: number | null;
	escalated_at: number | null;
	/** migration 0006: '<run>:<kind>' — a condition that comes back reopens the alert with this key */
	dedupe_key: Generated<string>;
	/** 1 when the condition cleared by itself (hysteresis), 0 when a person closed it */
	cleared_by_condition: Generated<number>;
	reopened_at: number | null;
}

// Alerts outbox, on-duty lists and run sign-off record (migration 0006).
export type DeliveryState = 'pending' | 'sent' | 'failed';
export interface AlertDeliveryTable {
	id: Generated<number>;
	alert_id: number;
	reason: 'raised' | 'reopened' | 'escalated';
	recipients_json: string;
	subject: string;
	body_text: string;
	state: Generated<DeliveryState>;
	attempts: Generated<number>;
	next_attempt_at: number;
	last_error: string | null;
	message_id: string | null;
	created_at: number;
	sent_at: number | null;
}

export interface AlertDutyTable {
	user_id: string;
	tier: 'first' | 'second';
	added_by: string | null;
	added_at: number;
}

export interface RunReviewTable {
	id: Generated<number>;
	run_id: number;
	revision: number;
	decision: 'signed' | 'returned' | 'revised';
	comment: Generated<string>;
	snapshot_json: Generated<string>;
	decided_by: string | null;
	decided_at: number;
}

export interface AuditLogTable {
	id: Generated<number>;
	at: number;
	actor_id: string | null;
	actor_label: string;
	action: string;
	object_type: string;
	object_id: string;
	summary: string;
	details_json: Generated<string>;
}

export interface LabSettingTable {
	key: string;
	value_json: string;
}

// Documents and upload staging (migration 0004).
export interface DocumentTable {
	id: Generated<number>;
	owner_type: 'cell' | 'thermometer';
	owner_id: number;
	kind: Generated<'assay' | 'certificate' | 'other'>;
	title: Generated<string>;
	filename: string;
	content_type: string;
	size_bytes: number;
	sha256: string;
	content: Buffer;
	uploaded_by: string | null;
	uploaded_at: number;
}

export type UploadState = 'receiving' | 'received' | 'parsing' | 'parsed' | 'failed' | 'confirmed' | 'discarded';

export interface UploadTable {
	id: string;
	purpose: 'run-log' | 'document';
	state: UploadState;
	filename: string;
	size_bytes: number;
	received_bytes: Generated<number>;
	parsed_bytes: Generated<number>;
	mapping_json: Generated<string>;
	good_rows: Generated<number>;
	bad_rows: Generated<number>;
	first_time_ms: number | null;
	last_time_ms: number | null;
	message: Generated<string>;
	run_id: number | null;
	created_by: string | null;
	created_at: number;
	updated_at: number;
}

export interface UploadRowTable {
	upload_id: string;
	seq: number;
	line: number;
	time_ms: number;
	ratio: number;
	current_ma: number;
	channel: number;
}

export interface UploadProblemTable {
	upload_id: string;
	line: number;
	field: string;
	reason: string;
}

export interface Database {
	user: UserTable;
	session: SessionTable;
	bench: BenchTable;
	cell: CellTable;
	thermometer: ThermometerTable;
	thermometer_rtpw: ThermometerRtpwTable;
	calibration: CalibrationTable;
	standard_resistor: StandardResistorTable;
	run: RunTable;
	reading: ReadingTable;
	run_event: RunEventTable;
	bench_token: BenchTokenTable;
	alert_rule: AlertRuleTable;
	alert_event: AlertEventTable;
	alert_delivery: AlertDeliveryTable;
	alert_duty: AlertDutyTable;
	run_review: RunReviewTable;
	audit_log: AuditLogTable;
	lab_setting: LabSettingTable;
	document: DocumentTable;
	upload: UploadTable;
	upload_row: UploadRowTable;
	upload_problem: UploadProblemTable;
}

export type Bench = Selectable<BenchTable>;
export type NewBench = Insertable<BenchTable>;
export type BenchUpdate = Updateable<BenchTable>;
export type Cell = Selectable<CellTable>;
export type NewCell = Insertable<CellTable>;
export type CellUpdate = Updateable<CellTable>;
export type Thermometer = Selectable<ThermometerTable>;
export type NewThermometer = Insertable<ThermometerTable>;
export type ThermometerUpdate = Updateable<ThermometerTable>;
export type ThermometerRtpw = Selectable<ThermometerRtpwTable>;
export type NewThermometerRtpw = Insertable<ThermometerRtpwTable>;
export type Calibration = Selectable<CalibrationTable>;
export type NewCalibration = Insertable<CalibrationTable>;
export type StandardResistor = Selectable<StandardResistorTable>;
export type NewStandardResistor = Insertable<StandardResistorTable>;
export type Run = Selectable<RunTable>;
export type NewRun = Insertable<RunTable>;
export type RunUpdate = Updateable<RunTable>;
export type Reading = Selectable<ReadingTable>;
export type NewReading = Insertable<ReadingTable>;
export type RunEvent = Selectable<RunEventTable>;
export type NewRunEvent = Insertable<RunEventTable>;
export type BenchToken = Selectable<BenchTokenTable>;
export type NewBenchToken = Insertable<BenchTokenTable>;
export type AlertRule = Selectable<AlertRuleTable>;
export type NewAlertRule = Insertable<AlertRuleTable>;
export type AlertEvent = Selectable<AlertEventTable>;
export type NewAlertEvent = Insertable<AlertEventTable>;
export type AlertDelivery = Selectable<AlertDeliveryTable>;
export type RunReview = Selectable<RunReviewTable>;
export type AuditEntry = Selectable<AuditLogTable>;
export type NewAuditEntry = Insertable<AuditLogTable>;
export type DocumentRow = Selectable<DocumentTable>;
export type Upload = Selectable<UploadTable>;
