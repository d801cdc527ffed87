// The OpenAPI 3.1 description of the instrument API, built from the same limits the code enforces.
import { MAX_BODY_BYTES, MAX_READINGS_PER_REQUEST, RATE_BURST, RATE_REQUESTS_PER_S, WS_MAX_PAYLOAD_BYTES } from './limits';
import { MAX_CURRENT_MILLIAMP } from './validate';

const error = (description: string) => ({ description, content: { 'application/json': { schema: { $ref: '#/components/schemas/Error' } } } });

export function openApiDocument(serverUrl: string) {
	return {
		openapi: '3.1.0',
		info: {
			title: 'Stillpoint instrument API',
			version: '1',
			description: `Readings from bridge instruments, with a bench token. Limits: ${MAX_READINGS_PER_REQUEST} readings and ${MAX_BODY_BYTES} bytes per request (413), ${RATE_REQUESTS_PER_S} requests/s per token with bursts of ${RATE_BURST} (429 + Retry-After). The WebSocket stream /ws/v1/ingest?runId= (frames up to ${WS_MAX_PAYLOAD_BYTES} bytes) is described in docs/ingest-protocol.md.`
		},
		servers: [{ url: serverUrl }],
		security: [{ benchToken: [] }],
		paths: {
			'/api/v1/bench/run': {
				get: {
					summary: "The token's bench and its run in the recording state",
					operationId: 'getBenchRun',
					responses: {
						'200': { description: 'The recording run', content: { 'application/json': { schema: { $ref: '#/components/schemas/BenchRun' } } } },
						'401': error('Missing, malformed or unknown token (invalid_token)'),
						'403': error('Token revoked (forbidden)'),
						'404': error('The bench has no recording run (no_active_run)'),
						'429': error('Too many requests for this token (rate_limited); see Retry-After')
					}
				}
			},
			'/api/v1/runs/{runId}/readings': {
				post: {
					summary: 'Store a batch of readings; answered after the commit that holds them',
					operationId: 'postReadings',
					parameters: [{ name: 'runId', in: 'path', required: true, schema: { type: 'string', pattern: '^[1-9][0-9]*$' } }],
					requestBody: {
						required: true,
						content: {
							'application/json': { schema: { type: 'object', required: ['readings'], properties: { readings: { type: 'array', maxItems: MAX_READINGS_PER_REQUEST, items: { $ref: '#/components/schemas/Reading' } } } } },
							'application/x-ndjson': { schema: { type: 'string', description: 'One Reading object (JSON) per line' } }
						}
					},
					responses: {
						'200': { description: 'Stored (or already held)', content: { 'application/json': { schema: { $ref: '#/components/schemas/BatchResult' } } } },
						'400': error('Not JSON / NDJSON, or not { "readings": [...] } (invalid_json, invalid_body, invalid_ndjson)'),
						'401': error('Missing, malformed or unknown token (invalid_token)'),
						'403': error('Token revoked, run of another bench (forbidden), or run not recording (run_not_recording)'),
						'404': error('No such run'),
						'413': error(`Body over ${MAX_BODY_BYTES} bytes (payload_too_large) or over ${MAX_READINGS_PER_REQUEST} readings (too_many_readings)`),
						'415': error('Content-Type is neither application/json nor application/x-ndjson'),
						'422': error('Some readings are invalid; the whole batch is refused, nothing stored (invalid_readings, details per reading)'),
						'429': error('Too many requests for this token (rate_limited); see Retry-After'),
						'503': error('The server is catching up or shutting down; retry after Retry-After')
					}
				}
			}
		},
		components: {
			securitySchemes: { benchToken: { type: 'http', scheme: 'bearer', description: 'spb_ followed by 43 base64url characters, made under Instruments' } },
			schemas: {
				Reading: {
					type: 'object',
					required: ['seq', 'timeMs', 'ratio', 'currentMilliAmp'],
					additionalProperties: false,
					properties: {
						seq: { type: 'integer', minimum: 0, description: 'Strictly increasing within a run; a seq already stored is a duplicate' },
						timeMs: { type: 'integer', minimum: 0, description: 'UTC milliseconds when the bridge took the reading' },
						ratio: { type: 'number', exclusiveMinimum: 0, description: 'Bridge ratio R_x/R_s exactly as reported (never rounded)' },
						currentMilliAmp: { type: 'number', exclusiveMinimum: 0, maximum: MAX_CURRENT_MILLIAMP },
						channel: { type: 'integer', minimum: 0, maximum: 63, default: 1 }
					}
				},
				BenchRun: {
					type: 'object',
					required: ['benchId', 'runId', 'state', 'highestDurableSeq'],
					properties: { benchId: { type: 'string' }, runId: { type: 'string' }, state: { const: 'recording' }, highestDurableSeq: { type: 'integer', description: '-1 when nothing is stored yet' } }
				},
				BatchResult: {
					type: 'object',
					required: ['accepted', 'duplicates', 'highestDurableSeq'],
					properties: {
						accepted: { type: 'integer' },
						duplicates: { type: 'integer' },
						highestDurableSeq: { type: 'integer' },
						timeBackwards: { type: 'integer', description: 'Readings stored whose timeMs is earlier than one the run already had (kept out of the plateau detector)' }
					}
				},
				Error: {
					type: 'object',
					required: ['error'],
					properties: {
						error: {
							type: 'object',
							required: ['code', 'message'],
							properties: {
								code: { type: 'string' },
								message: { type: 'string' },
								details: {
									description: 'For invalid_readings: one entry per problem',
									type: 'array',
									items: { type: 'object', properties: { index: { type: 'integer' }, seq: { type: ['integer', 'null'] }, field: { type: 'string' }, value: {}, reason: { type: 'string' } } }
								}
							}
						}
					}
				}
			}
		}
	};
}
