// Public API of the bench simulator (imported by the plateau detector's evaluation and the demo).

export { listScenarios, simulate, simulateStream, DEFAULT_SEED, type SimStream } from './simulate';
export { resolveParams, SCENARIOS } from './scenarios';
export { PARAM_DOCS, FAULT_KINDS, type ScenarioParams, type ScenarioOverrides, type FaultKind } from './params';
export type { SimReading, SimEvent, SimEventKind, GroundTruth, BadValueKind } from './types';
export type { Thermometer } from './thermometer';
export type { NoiseFreeTrace } from './truth';
export { runBench, type BenchOptions, type BenchController, type BenchResult } from './bench';
export { TokenRefusedError, RunUnavailableError } from './client-common';
export { noiseSlopeStdDevMilliKelvinPerHour } from './noise-slope';
