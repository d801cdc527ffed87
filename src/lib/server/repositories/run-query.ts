import { z } from 'zod';
import type { DB } from '../db';

// The runs table: filters, sort and pagination done by the database, from URL search parameters.

const SORTABLE = {
	id: 'run.id',
	started: 'run.started_at',
	point: 'run.fixed_point',
	bench: 'bench.name',
	cell: 'cell.serial',
	thermometer: 'thermometer.serial',
	state: 'run.state',
	readings: 'run.reading_count'
} as const;

const optionalId = z.preprocess((v) => (v === '' || v == null ? undefined : v), z.coerce.number().int().positive().optional());
const optionalText = z.preprocess((v) => (v === '' || v == null ? undefined : v), z.string().max(40).optional());
const optionalDate = z.preprocess((v) => (v === '' || v == null ? undefined : v), z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'dates are YYYY-MM-DD').optional());

export const runFilterSchema = z.object({
	bench: optionalId,
	cell: optionalId,
	thermometer: optionalId,
	point: z.preprocess((v) => (v === '' || v == null ? undefined : v), z.enum(['Ar', 'Hg', 'TPW', 'Ga', 'In', 'Sn', 'Zn', 'Al', 'Ag']).optional()),
	state: z.preprocess((v) => (v === '' || v == null ? undefined : v), z.enum(['setup', 'recording', 'finished', 'abandoned']).optional()),
	from: optionalDate,
	to: optionalDate,
	q: optionalText,
	sort: z.preprocess((v) => (v === '' || v == null ? 'started' : v), z.enum(Object.keys(SORTABLE) as [keyof typeof SORTABLE, ...(keyof typeof SORTABLE)[]])),
	dir: z.preprocess((v) => (v === '' || v == null ? 'desc' : v), z.enum(['asc', 'desc'])),
	page: z.preprocess((v) => (v === '' || v == null ? 1 : v), z.coerce.number().int().min(1).max(100_000)),
	size: z.preprocess((v) => (v === '' || v == null ? 25 : v), z.coerce.number().int().min(5).max(200))
});
export type RunFilter = z.infer<typeof runFilterSchema>;

export function parseRunFilter(params: URLSearchParams): { filter: RunFilter; problems: string[] } {
	const parsed = runFilterSchema.safeParse(Object.fromEntries(params));
	if (parsed.success) return { filter: parsed.data, problems: [] };
	// Drop only the bad parameters, keep the rest of the person's filter.
	const bad = new Set(parsed.error.issues.map((i) => String(i.path[0])));
	const kept = Object.fromEntries([...params].filter(([k]) => !bad.has(k)));
	return {
		filter: runFilterSchema.parse(kept),
		problems: parsed.error.issues.map((i) => `${String(i.path[0])}: ${i.message}`)
	};
}

const DAY_MS = 86_400_000;

export async function queryRuns(db: DB, f: RunFilter) {
	let q = db
		.selectFrom('run')
		.innerJoin('bench', 'bench.id', 'run.bench_id')
		.innerJoin('cell', 'cell.id', 'run.cell_id')
		.innerJoin('thermometer', 'thermometer.id', 'run.thermometer_id')
		.leftJoin('user as operator', 'operator.id', 'run.operator_id');
	if (f.bench) q = q.where('run.bench_id', '=', f.bench);
	if (f.cell) q = q.where('run.cell_id', '=', f.cell);
	if (f.thermometer) q = q.where('run.thermometer_id', '=', f.thermometer);
	if (f.point) q = q.where('run.fixed_point', '=', f.point);
	if (f.state) q = q.where('run.state', '=', f.state);
	if (f.from) q = q.where('run.created_at', '>=', Date.parse(`${f.from}T00:00:00Z`));
	if (f.to) q = q.where('run.created_at', '<', Date.parse(`${f.to}T00:00:00Z`) + DAY_MS);
	if (f.q) {
		const like = `%${f.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
		q = q.where((eb) => eb.or([eb('run.notes', 'like', like), eb('cell.serial', 'like', like), eb('thermometer.serial', 'like', like)]));
	}
	const total = Number((await q.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()).n);
	const rows = await q
		.select([
			'run.id',
			'run.fixed_point',
			'run.kind',
			'run.state',
			'run.review_state',
			'run.created_at',
			'run.started_at',
			'run.ended_at',
			'run.reading_count',
			'bench.name as bench_name',
			'cell.serial as cell_serial',
			'thermometer.serial as thermometer_serial',
			'operator.name as operator_name'
		])
		.orderBy(SORTABLE[f.sort], f.dir)
		.orderBy('run.id', f.dir)
		.limit(f.size)
		.offset((f.page - 1) * f.size)
		.execute();
	return { rows, total, pages: Math.max(1, Math.ceil(total / f.size)) };
}
