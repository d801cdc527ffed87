// Wires the alert engine and the e-mail outbox to the process's ingest (called once, from ingestService).

import type { IngestService } from '../ingest/service';
import { startOutbox } from '../mail/outbox';
import { AlertEngine, setAlertEngine } from './engine';

export function startAlerts(service: IngestService, env: NodeJS.ProcessEnv = process.env): AlertEngine {
	const engine = new AlertEngine(service.sqlite, { env, publisher: service.hub });
	const outbox = startOutbox(service.sqlite, { env, onChange: (id) => engine.changed(id) });
	service.observers.add((u) => engine.observe(u));
	service.closers.push(
		() => engine.close(),
		() => outbox.close()
	);
	setAlertEngine(engine);
	return engine;
}
