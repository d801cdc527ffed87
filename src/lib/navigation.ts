/** The app's areas, in the order the shell shows them. */
export const AREAS = [
	{ path: '/benches', label: 'Benches', hint: 'Every bench, live' },
	{ path: '/runs', label: 'Runs', hint: 'Realizations, past and present' },
	{ path: '/cells', label: 'Cells', hint: 'Fixed-point cells and their history' },
	{ path: '/thermometers', label: 'Thermometers', hint: 'SPRTs, R_TPW and calibrations' },
	{ path: '/compare', label: 'Compare', hint: 'Plateaux side by side' },
	{ path: '/calibrations', label: 'Calibrations', hint: 'SPRT deviation functions, tables and reports' },
	{ path: '/alerts', label: 'Alerts', hint: 'What needs a person' },
	{ path: '/instruments', label: 'Instruments', hint: 'Bench tokens and the instrument protocol' },
	{ path: '/calculations', label: 'Calculations', hint: 'Equations, sources and a calculator' },
	{ path: '/admin', label: 'Admin', hint: 'People, roles and the audit trail' }
] as const;

export type AreaPath = (typeof AREAS)[number]['path'];
