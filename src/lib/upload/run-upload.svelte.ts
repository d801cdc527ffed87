// The state of one past-run upload in the browser: file → mapping (with a preview parsed here by
// papaparse) → run details → send with progress → server parse with progress → bad rows → confirm.
import Papa from 'papaparse';
import { ApiFailure, api, sendFile } from './client';
import { guessColumns, guessTimeUnit, mappingSchema, validateRow, type ColumnMapping, type RowResult, type UploadStatus } from './mapping';

export type ServerStatus = UploadStatus;

export interface RunDetails {
	benchId: number | null;
	cellId: number | null;
	thermometerId: number | null;
	resistorId: number | null;
	fixedPoint: string;
	kind: 'melt' | 'freeze' | 'triple-point';
	sensorDepthM: number;
	gasPressurePa: number;
	notes: string;
}

export type Phase = 'choose' | 'map' | 'sending' | 'parsing' | 'review' | 'confirming' | 'done';

const PREVIEW_ROWS = 12;

function looksNumeric(s: string): boolean {
	return /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(s.trim());
}

export class RunUpload {
	phase = $state<Phase>('choose');
	file = $state<File | null>(null);
	/** The first lines of the file, split into fields. */
	sample = $state<string[][]>([]);
	mapping = $state<ColumnMapping>({
		delimiter: ',',
		headerRow: true,
		columns: { time: 0, ratio: 1, current: 2, channel: null, seq: null },
		timeUnit: 'iso',
		timeZone: 'UTC',
		currentUnit: 'mA',
		channelDefault: 1
	});
	details = $state<RunDetails>({ benchId: null, cellId: null, thermometerId: null, resistorId: null, fixedPoint: '', kind: 'melt', sensorDepthM: 0, gasPressurePa: 101325, notes: '' });
	sentBytes = $state(0);
	status = $state<ServerStatus | null>(null);
	skipBadRows = $state(false);
	error = $state<string | null>(null);
	runId = $state<number | null>(null);

	readonly header = $derived(this.mapping.headerRow && this.sample.length > 0 ? this.sample[0] : []);
	readonly columnCount = $derived(Math.max(0, ...this.sample.map((r) => r.length)));
	readonly mappingIssues = $derived.by(() => {
		const r = mappingSchema.safeParse(this.mapping);
		return r.success ? [] : r.error.issues.map((i) => i.message);
	});
	/** Preview rows with their line number and what the mapping makes of them. */
	readonly preview = $derived.by((): { line: number; fields: string[]; result: RowResult }[] => {
		const rows = this.mapping.headerRow ? this.sample.slice(1) : this.sample;
		const first = this.mapping.headerRow ? 2 : 1;
		return rows.map((fields, i) => ({ line: first + i, fields, result: validateRow(fields, this.mapping, first + i) }));
	});

	async choose(file: File | null): Promise<void> {
		this.reset();
		this.file = file;
		if (!file) return;
		const head = await new Promise<Papa.ParseResult<string[]>>((resolve, reject) =>
			Papa.parse<string[]>(file, { preview: PREVIEW_ROWS, skipEmptyLines: 'greedy', complete: resolve, error: reject })
		);
		this.sample = head.data;
		const d = head.meta.delimiter;
		const delimiter = d === '\t' || d === ';' ? d : ',';
		const first = head.data[0] ?? [];
		const headerRow = first.length > 0 && !first.some(looksNumeric);
		const columns = guessColumns(headerRow ? first : first.map((_, i) => `column ${i + 1}`));
		const dataRow = head.data[headerRow ? 1 : 0] ?? [];
		this.mapping = { ...this.mapping, delimiter, headerRow, columns, timeUnit: guessTimeUnit(dataRow[columns.time] ?? '') };
		this.phase = 'map';
	}

	reset(): void {
		this.phase = 'choose';
		this.file = null;
		this.sample = [];
		this.sentBytes = 0;
		this.status = null;
		this.skipBadRows = false;
		this.error = null;
		this.runId = null;
	}

	/** Sends the file, starts the server's parse and follows it until it ends. */
	async send(): Promise<void> {
		if (!this.file) return;
		this.error = null;
		this.phase = 'sending';
		this.sentBytes = 0;
		try {
			const id = await sendFile(this.file, 'run-log', (sent) => (this.sentBytes = sent));
			this.phase = 'parsing';
			await api('POST', `/api/v1/uploads/${id}/parse`, $state.snapshot(this.mapping));
			for (;;) {
				const s = await api<ServerStatus>('GET', `/api/v1/uploads/${id}`);
				this.status = s;
				if (s.state !== 'parsing') break;
				await new Promise((r) => setTimeout(r, 400));
			}
			if (this.status?.state === 'failed') {
				this.error = this.status.message;
				this.phase = 'map';
			} else this.phase = 'review';
		} catch (e) {
			this.error = e instanceof ApiFailure ? e.message : String(e);
			this.phase = 'map';
		}
	}

	/** Fix and upload again: the staged rows go, the mapping stays. */
	async discard(): Promise<void> {
		if (this.status) await api('DELETE', `/api/v1/uploads/${this.status.id}`).catch(() => undefined);
		const mapping = $state.snapshot(this.mapping);
		this.reset();
		this.mapping = mapping;
	}

	async confirm(): Promise<void> {
		if (!this.status) return;
		this.error = null;
		this.phase = 'confirming';
		try {
			const d = $state.snapshot(this.details);
			const r = await api<{ runId: number }>('POST', `/api/v1/uploads/${this.status.id}/confirm`, { ...d, skipBadRows: this.skipBadRows });
			this.runId = r.runId;
			this.phase = 'done';
		} catch (e) {
			this.error = e instanceof ApiFailure ? e.message : String(e);
			this.phase = 'review';
		}
	}
}
