import type { Migration } from 'kysely';
import * as auth from './2026-12-01_0001_auth';
import * as domain from './2026-12-01_0002_domain';
import * as documents from './2026-12-02_0004_documents';
import * as calibration from './2026-12-02_0005_calibration';
import * as alerts from './2026-12-02_0006_alerts';

// Every migration, by name, in order. Listed explicitly (not read from the folder at run time) so that
// the bundled server, tsx scripts and tests all apply exactly the same set.
export const migrations: Record<string, Migration> = {
	'2026-12-01_0001_auth': auth,
	'2026-12-01_0002_domain': domain,
	'2026-12-02_0004_documents': documents,
	'2026-12-02_0005_calibration': calibration,
	'2026-12-02_0006_alerts': alerts
};
