// `npm run bench`: every benchmark, each figure printed as `name: value unit (ratio x baseline)` with its
// baseline measured in the same run on this machine. `npm run bench -- plateau` runs one of them.
import { runIngestBench } from './bench/ingest';
import { runPlateauBench } from './bench/plateau';
import { runLivePageBench } from './bench/live-page';

const BENCHES: Record<string, () => Promise<string[]>> = {
	ingest: runIngestBench,
	plateau: runPlateauBench,
	'live-page': runLivePageBench
};

const chosen = process.argv.slice(2).filter((a) => !a.startsWith('-'));
const names = chosen.length ? chosen : Object.keys(BENCHES);
const unknown = names.filter((n) => !(n in BENCHES));
if (unknown.length) {
	console.error(`unknown benchmark ${unknown.join(', ')}; choose from ${Object.keys(BENCHES).join(', ')}`);
	process.exit(64);
}
for (const name of names) {
	console.log(`\n== ${name}`);
	const lines = await BENCHES[name]();
	for (const line of lines) console.log(line);
}
