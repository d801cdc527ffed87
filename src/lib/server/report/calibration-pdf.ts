// The calibration report as a PDF (pdfkit), in Stillpoint's own layout: fonts embedded (the WOFF files
// of @fontsource, which pdfkit's fontkit reads and subsets), every number in JetBrains Mono with its
// unit, the deviation curve drawn as vector paths, and the laboratory's review statement.
import PDFDocument from 'pdfkit';
import { createRequire } from 'node:module';
import { fixedPoint, subrange as subrangeOf } from '../../metrology/index';
import type { CalibrationReport } from '../calibration/service';

const require = createRequire(import.meta.url);
const FONT_FILES = {
	body: '@fontsource/atkinson-hyperlegible/files/atkinson-hyperlegible-latin-400-normal.woff',
	bold: '@fontsource/atkinson-hyperlegible/files/atkinson-hyperlegible-latin-700-normal.woff',
	mono: '@fontsource/jetbrains-mono/files/jetbrains-mono-latin-400-normal.woff',
	monoBold: '@fontsource/jetbrains-mono/files/jetbrains-mono-latin-700-normal.woff',
	// the Latin subsets hold no Greek: Ω and Δ come from JetBrains Mono's Greek subset
	greek: '@fontsource/jetbrains-mono/files/jetbrains-mono-greek-400-normal.woff'
} as const;
type FontName = keyof typeof FONT_FILES;

const INK = '#18201d';
const MUTED = '#56625c';
const LINE = '#c9d0ca';
const STEADY = '#0d6b62';
const CAUTION = '#9a5200';
const SOFT = '#eef3ef';

const PAGE = { width: 595.28, height: 841.89, margin: 48 };
const CONTENT_W = PAGE.width - 2 * PAGE.margin;

export function reportFilename(r: CalibrationReport): string {
	return `calibration-${r.thermometer.serial.replace(/[^A-Za-z0-9._-]/g, '_')}-v${r.version}.pdf`;
}

/** Signed with a true minus sign, fixed digits. */
export function signed(v: number, digits: number): string {
	const t = Math.abs(v).toFixed(digits);
	return v < 0 && Number(t) !== 0 ? `−${t}` : t;
}

export function sci(v: number, digits = 5): string {
	if (v === 0) return '0';
	const [m, e] = v.toExponential(digits - 1).split('e');
	const mant = m.startsWith('-') ? `−${m.slice(1)}` : m;
	const exp = Number(e);
	return `${mant} × 10^${exp < 0 ? `−${Math.abs(exp)}` : exp}`;
}

class Writer {
	doc: PDFKit.PDFDocument;
	y = PAGE.margin;
	constructor(doc: PDFKit.PDFDocument) {
		this.doc = doc;
	}

	/** Width of a string whose Greek letters are set in the Greek font. */
	width(text: string, font: FontName, size: number): number {
		let w = 0;
		for (const [part, greek] of splitGreek(text)) w += this.doc.font(greek ? 'greek' : font).fontSize(size).widthOfString(part);
		return w;
	}

	/** One line of text at (x, y), no wrapping, aligned in a box of `width` when given. */
	put(text: string, x: number, y: number, o: { font?: FontName; size?: number; color?: string; align?: 'left' | 'right' | 'center'; width?: number } = {}): void {
		const font = o.font ?? 'body';
		const size = o.size ?? 9.5;
		const total = this.width(text, font, size);
		let cx = x;
		if (o.width !== undefined && o.align === 'right') cx = x + o.width - total;
		if (o.width !== undefined && o.align === 'center') cx = x + (o.width - total) / 2;
		this.doc.fillColor(o.color ?? INK);
		for (const [part, greek] of splitGreek(text)) {
			this.doc.font(greek ? 'greek' : font).fontSize(size).text(part, cx, y, { lineBreak: false });
			cx += this.doc.widthOfString(part);
		}
	}

	/** A wrapped paragraph (no Greek letters in these). */
	para(text: string, o: { size?: number; color?: string; font?: FontName; gap?: number } = {}): void {
		this.doc.font(o.font ?? 'body').fontSize(o.size ?? 9.5).fillColor(o.color ?? INK);
		const h = this.doc.heightOfString(text, { width: CONTENT_W });
		this.ensure(h + 4);
		this.doc.text(text, PAGE.margin, this.y, { width: CONTENT_W });
		this.y += h + (o.gap ?? 6);
	}

	/** A section heading, kept on the page with at least `keep` points of what follows. */
	heading(text: string, keep = 60): void {
		this.ensure(30 + keep);
		this.y += 8;
		this.put(text, PAGE.margin, this.y, { font: 'bold', size: 12.5, color: STEADY });
		this.y += 18;
		this.doc.moveTo(PAGE.margin, this.y - 3).lineTo(PAGE.margin + CONTENT_W, this.y - 3).lineWidth(0.6).strokeColor(LINE).stroke();
		this.y += 4;
	}

	ensure(h: number): void {
		if (this.y + h > PAGE.height - PAGE.margin - 24) {
			this.doc.addPage();
			this.y = PAGE.margin;
		}
	}

	/** A table: columns with widths, header row, body rows; numbers right-aligned in mono. */
	table(cols: { title: string; width: number; align?: 'left' | 'right'; mono?: boolean }[], rows: string[][], o: { highlight?: (i: number) => boolean } = {}): void {
		const rowH = 14;
		const header = () => {
			this.ensure(rowH * 2);
			let x = PAGE.margin;
			for (const c of cols) {
				this.put(c.title, x + 3, this.y + 3, { font: 'bold', size: 8, color: MUTED, align: c.align ?? 'right', width: c.width - 6 });
				x += c.width;
			}
			this.y += rowH;
			this.doc.moveTo(PAGE.margin, this.y).lineTo(PAGE.margin + CONTENT_W, this.y).lineWidth(0.6).strokeColor(LINE).stroke();
			this.y += 2;
		};
		header();
		rows.forEach((row, i) => {
			if (this.y + rowH > PAGE.height - PAGE.margin - 24) {
				this.doc.addPage();
				this.y = PAGE.margin;
				header();
			}
			if (o.highlight?.(i)) this.doc.rect(PAGE.margin, this.y - 1, CONTENT_W, rowH).fill(SOFT);
			let x = PAGE.margin;
			row.forEach((cell, j) => {
				const c = cols[j];
				this.put(cell, x + 3, this.y + 2, { font: c.mono === false ? 'body' : 'mono', size: 8, align: c.align ?? 'right', width: c.width - 6 });
				x += c.width;
			});
			this.y += rowH;
		});
		this.y += 6;
	}
}

function splitGreek(text: string): [string, boolean][] {
	const out: [string, boolean][] = [];
	for (const m of text.matchAll(/([\u0370-\u03ff]+)|([^\u0370-\u03ff]+)/g)) out.push([m[0], m[1] !== undefined]);
	return out;
}

function niceStep(span: number, target: number): number {
	const raw = span / target;
	const p = 10 ** Math.floor(Math.log10(raw));
	for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= raw) return m * p;
	return 10 * p;
}

/** The deviation curve ΔW(T90), in mK equivalent, with the calibration points marked: vector paths only. */
function deviationChart(w: Writer, r: CalibrationReport): void {
	const h = 210;
	w.ensure(h + 30);
	const doc = w.doc;
	const box = { x: PAGE.margin + 58, y: w.y + 8, w: CONTENT_W - 70, h: h - 50 };
	const xs = r.curve.map((p) => p.t90Celsius);
	const ys = r.curve.map((p) => p.deviationMilliKelvin);
	const x0 = Math.min(...xs);
	const x1 = Math.max(...xs);
	let y0 = Math.min(0, ...ys);
	let y1 = Math.max(0, ...ys);
	if (y1 - y0 < 1e-6) (y0 -= 1), (y1 += 1);
	const yStep = niceStep(y1 - y0, 5);
	y0 = Math.floor(y0 / yStep) * yStep;
	y1 = Math.ceil(y1 / yStep) * yStep;
	const xStep = niceStep(x1 - x0, 8);
	const px = (c: number) => box.x + ((c - x0) / (x1 - x0)) * box.w;
	const py = (v: number) => box.y + box.h - ((v - y0) / (y1 - y0)) * box.h;
	doc.lineWidth(0.4).strokeColor(LINE);
	for (let v = y0; v <= y1 + 1e-9; v += yStep) {
		doc.moveTo(box.x, py(v)).lineTo(box.x + box.w, py(v)).stroke();
		w.put(signed(v, yStep < 1 ? 1 : 0), PAGE.margin, py(v) - 4, { font: 'mono', size: 7.5, color: MUTED, align: 'right', width: 52 });
	}
	for (let c = Math.ceil(x0 / xStep) * xStep; c <= x1 + 1e-9; c += xStep) {
		doc.moveTo(px(c), box.y).lineTo(px(c), box.y + box.h).stroke();
		w.put(c.toFixed(0), px(c) - 20, box.y + box.h + 4, { font: 'mono', size: 7.5, color: MUTED, align: 'center', width: 40 });
	}
	doc.rect(box.x, box.y, box.w, box.h).lineWidth(0.8).strokeColor(MUTED).stroke();
	// zero line, then the curve
	doc.moveTo(box.x, py(0)).lineTo(box.x + box.w, py(0)).lineWidth(0.8).dash(2, { space: 2 }).strokeColor(MUTED).stroke().undash();
	r.curve.forEach((p, i) => (i === 0 ? doc.moveTo(px(p.t90Celsius), py(p.deviationMilliKelvin)) : doc.lineTo(px(p.t90Celsius), py(p.deviationMilliKelvin))));
	doc.lineWidth(1.6).strokeColor(STEADY).stroke();
	for (const pt of subrangeOf(r.subrange).points) {
		const fp = fixedPoint(pt);
		const near = r.curve.reduce((a, b) => (Math.abs(b.t90Celsius - fp.t90Celsius) < Math.abs(a.t90Celsius - fp.t90Celsius) ? b : a));
		const cx = px(fp.t90Celsius);
		const cy = py(near.deviationMilliKelvin);
		doc.circle(cx, cy, 3.2).fillAndStroke(CAUTION, CAUTION);
		w.put(pt, cx - 15, cy - 14, { font: 'bold', size: 8, color: CAUTION, align: 'center', width: 30 });
	}
	w.put('t90 (°C)', box.x, box.y + box.h + 16, { size: 8.5, color: MUTED, align: 'center', width: box.w });
	doc.save();
	doc.rotate(-90, { origin: [PAGE.margin + 6, box.y + box.h / 2] });
	w.put('ΔW as temperature (mK)', PAGE.margin + 6 - 60, box.y + box.h / 2 - 4, { size: 8.5, color: MUTED, align: 'center', width: 120 });
	doc.restore();
	w.y += h;
}

export async function calibrationPdf(r: CalibrationReport): Promise<Buffer> {
	const doc = new PDFDocument({
		size: 'A4',
		margin: PAGE.margin,
		bufferPages: true,
		info: { Title: `SPRT calibration ${r.thermometer.serial} v${r.version}`, Author: r.labName, Subject: `Deviation function ${r.subrange}`, Creator: 'Stillpoint' }
	});
	for (const [name, file] of Object.entries(FONT_FILES)) doc.registerFont(name, require.resolve(file));
	const chunks: Buffer[] = [];
	doc.on('data', (c: Buffer) => chunks.push(c));
	const done = new Promise<Buffer>((ok, fail) => {
		doc.on('end', () => ok(Buffer.concat(chunks)));
		doc.on('error', fail);
	});
	const w = new Writer(doc);
	const sr = subrangeOf(r.subrange);
	const issued = new Date(r.createdAt).toISOString().replace('T', ' ').slice(0, 16) + ' UTC';

	// Title band
	doc.rect(0, 0, PAGE.width, 92).fill(STEADY);
	w.put(r.labName, PAGE.margin, 26, { font: 'bold', size: 11, color: '#ffffff' });
	w.put(`SPRT calibration · ${r.thermometer.serial}`, PAGE.margin, 44, { font: 'bold', size: 20, color: '#ffffff' });
	w.put(`version ${r.version} (${r.status}) · issued ${issued}`, PAGE.margin, 70, { font: 'mono', size: 9, color: '#d4ebe6' });
	w.y = 110;

	w.heading('Thermometer');
	const facts: [string, string][] = [
		['Serial', r.thermometer.serial],
		['Kind · maker', `${r.thermometer.kind} · ${r.thermometer.maker}`],
		['Nominal resistance', `${r.thermometer.nominalOhm} Ω`],
		['Sub-range', `${r.subrange}: ${(sr.minKelvin - 273.15).toFixed(2)} °C to ${(sr.maxKelvin - 273.15).toFixed(3)} °C (${sr.minKelvin} K to ${sr.maxKelvin} K)`],
		['R_TPW of this calibration', `${r.rTpwOhm.toFixed(7)} Ω`],
		['Computed by', r.createdBy ?? '—']
	];
	for (const [k, v] of facts) {
		w.put(k, PAGE.margin, w.y, { color: MUTED });
		w.put(v, PAGE.margin + 150, w.y, { font: /\d/.test(v) && k !== 'Kind · maker' ? 'mono' : 'body', size: 9.5 });
		w.y += 14;
	}

	w.heading('Fixed-point runs used');
	if (r.fromRuns) {
		w.table(
			[
				{ title: 'Point', width: 44, align: 'left', mono: false },
				{ title: 'Run', width: 40 },
				{ title: 'Cell', width: 64, align: 'left' },
				{ title: 'Plateau (UTC)', width: 74 },
				{ title: 'W', width: 80 },
				{ title: 'R_TPW (Ω)', width: 72 },
				{ title: 'R (Ω)', width: 72 },
				{ title: 'u (mK)', width: CONTENT_W - 446 }
			],
			[
				['TPW', '—', '—', '—', '1 (by definition)', r.rTpwOhm.toFixed(7), r.rTpwOhm.toFixed(7), r.uncertainty.uTpwMilliKelvin.toFixed(3)],
				...r.runs.map((run, i) => [run.point, `#${run.runId}`, run.cellSerial, new Date(run.plateauMidMs).toISOString().slice(0, 10), run.w.toFixed(9), run.rTpwOhm.toFixed(7), run.resistanceOhm.toFixed(6), (r.uncertainty.points[i]?.uMilliKelvin ?? NaN).toFixed(3)])
			]
		);
		w.para('W is the measured resistance ratio R/R_TPW at zero current, with the hydrostatic-head and gas-pressure effects (ITS-90 Table 2) removed, each reading referred to the R_TPW measured nearest in time. u is the standard uncertainty of the plateau value from the run’s own budget.', { size: 8.5, color: MUTED });
	} else {
		w.para('This version was entered with its coefficients only; no runs are on file for it.', { color: MUTED });
	}

	w.heading('Deviation-function coefficients');
	const names = Object.entries(r.coefficients).filter(([k]) => k !== 'wAl');
	for (const [k, v] of names) {
		w.put(k, PAGE.margin, w.y, { font: 'bold', size: 10 });
		w.put(`${sci(v, 5)}  (dimensionless)`, PAGE.margin + 30, w.y, { font: 'mono', size: 10 });
		w.y += 15;
	}
	if (r.coefficients.wAl !== undefined) {
		w.put(`W(Al) = ${r.coefficients.wAl.toFixed(8)}`, PAGE.margin, w.y, { font: 'mono', size: 9.5 });
		w.y += 15;
	}
	w.put(`W − W_r(T90) = ΔW(W), ITS-90 form for ${r.subrange}`, PAGE.margin, w.y + 2, { size: 8.5, color: MUTED });
	w.y += 18;

	if (r.residuals.length) {
		w.heading('Residuals at the calibration points (zero by construction)');
		w.table(
			[
				{ title: 'Point', width: 60, align: 'left', mono: false },
				{ title: 'W measured', width: 100 },
				{ title: 'W_r(T90)', width: 100 },
				{ title: 'ΔW(W)', width: 100 },
				{ title: 'residual W', width: 70 },
				{ title: 'residual (mK)', width: CONTENT_W - 430 }
			],
			r.residuals.map((x) => [x.point, x.w.toFixed(9), x.wr.toFixed(9), sci(x.deviation, 4), signed(x.residualW, 12).replace(/0{6}$/, '0'), signed(x.residualMilliKelvin, 6)])
		);
	}

	w.heading('Deviation curve', 220);
	deviationChart(w, r);

	w.heading(`Table at ${r.stepCelsius} °C steps`);
	w.table(
		[
			{ title: 't90 (°C)', width: 66 },
			{ title: 'T90 (K)', width: 70 },
			{ title: 'W', width: 86 },
			{ title: 'R (Ω)', width: 82 },
			{ title: 'dR/dT (Ω/K)', width: 72 },
			{ title: 'u (mK)', width: 58 },
			{ title: 'U, k = 2 (mK)', width: CONTENT_W - 434 }
		],
		r.table.map((row) => [
			`${row.point ? `${row.point}  ` : ''}${signed(row.t90Celsius, 3)}`,
			row.t90Kelvin.toFixed(4),
			row.w.toFixed(8),
			row.resistanceOhm.toFixed(6),
			row.ohmPerKelvin.toFixed(6),
			row.uMilliKelvin === null ? '—' : row.uMilliKelvin.toFixed(3),
			row.expandedMilliKelvin === null ? '—' : row.expandedMilliKelvin.toFixed(3)
		]),
		{ highlight: (i) => r.table[i].point !== null }
	);

	w.heading('Uncertainty');
	if (r.uncertainty.points.length) {
		for (const p of r.uncertainty.points) {
			w.ensure(20 + 12 * p.components.length);
			w.put(`${fixedPoint(p.point).name} (run #${p.runId}): u = ${p.uMilliKelvin.toFixed(4)} mK, u(W) = ${sci(p.uW, 3)}`, PAGE.margin, w.y, { font: 'bold', size: 9 });
			w.y += 13;
			for (const c of p.components) {
				w.put(c.name, PAGE.margin + 12, w.y, { size: 8.5, color: MUTED });
				w.put(`${c.contributionMilliKelvin.toFixed(4)} mK (${c.distribution})`, PAGE.margin + 270, w.y, { font: 'mono', size: 8.5 });
				w.y += 12;
			}
			w.y += 4;
		}
		w.put(`TPW realization behind R_TPW: u = ${r.uncertainty.uTpwMilliKelvin.toFixed(3)} mK (laboratory setting)`, PAGE.margin, w.y, { size: 9 });
		w.y += 16;
		w.para(`Propagation: ${r.uncertainty.note}`, { size: 8.5, color: MUTED });
		w.para('The non-uniqueness of the scale and the uncertainty of later use (the user’s own R_TPW, self-heating and immersion) are not included.', { size: 8.5, color: MUTED });
	} else w.para('No uncertainty is on file for this version.', { color: MUTED });

	if (r.notes) {
		w.heading('Notes');
		w.para(r.notes);
	}

	w.heading('Statement');
	w.para(
		`These results were computed by Stillpoint from the laboratory’s stored fixed-point runs. They are for review under the quality system of ${r.labName} and the regulations that apply locally; the laboratory decides whether and how they are released. The figures are valid for the thermometer identified above, in the condition it was in when the runs were made.`,
		{ size: 9.5 }
	);

	const range = doc.bufferedPageRange();
	for (let i = range.start; i < range.start + range.count; i++) {
		doc.switchToPage(i);
		const y = PAGE.height - PAGE.margin + 6;
		doc.moveTo(PAGE.margin, y - 6).lineTo(PAGE.margin + CONTENT_W, y - 6).lineWidth(0.5).strokeColor(LINE).stroke();
		w.put(`${r.thermometer.serial} · calibration v${r.version} · ${r.subrange}`, PAGE.margin, y, { size: 7.5, color: MUTED });
		w.put(`page ${i + 1} of ${range.count}`, PAGE.margin, y, { font: 'mono', size: 7.5, color: MUTED, align: 'right', width: CONTENT_W });
	}
	doc.end();
	return done;
}
