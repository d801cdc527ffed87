// The demo scenario: an invented laboratory with invented people, benches, cells and thermometers.
// Nothing here describes a real organisation, instrument or person. Values are plausible, not measured.
import type { Role } from '../auth/types';
import type { FixedPointCode } from '../db/schema';

export const DEMO_LAB_NAME = 'Kestrel Vale Thermometry Laboratory';

export const DEMO_USERS: { name: string; email: string; password: string; role: Role }[] = [
	{ name: 'Tomas Varga', email: 'tomas.varga@kestrelvale.example', password: 'bench-tech-2026', role: 'technician' },
	{ name: 'Mei Lindqvist', email: 'mei.lindqvist@kestrelvale.example', password: 'bench-tech-2026', role: 'technician' },
	{ name: 'Ruth Adeyemi', email: 'ruth.adeyemi@kestrelvale.example', password: 'supervise-2026', role: 'supervisor' },
	{ name: 'Ilse Marchetti', email: 'ilse.marchetti@kestrelvale.example', password: 'engineer-2026', role: 'engineer' },
	{ name: 'Priya Rao', email: 'priya.rao@kestrelvale.example', password: 'admin-kestrel-2026', role: 'admin' }
];

export const DEMO_BENCHES = [
	{ name: 'Bench 1 · water and gallium', location: 'Room 014', heat_source_kind: 'bath' as const, heat_source: 'Stirred maintenance bath KV-MB2', bridge: 'Ratio bridge KV-BR1', bridge_channel: 1 },
	{ name: 'Bench 2 · indium and tin', location: 'Room 016', heat_source_kind: 'furnace' as const, heat_source: 'Three-zone furnace KV-F3', bridge: 'Ratio bridge KV-BR1', bridge_channel: 2 },
	{ name: 'Bench 3 · zinc', location: 'Room 016', heat_source_kind: 'furnace' as const, heat_source: 'Heat-pipe furnace KV-HP4', bridge: 'Ratio bridge KV-BR2', bridge_channel: 1 },
	{ name: 'Bench 4 · aluminium and silver', location: 'Room 018', heat_source_kind: 'furnace' as const, heat_source: 'Heat-pipe furnace KV-HP7', bridge: 'Ratio bridge KV-BR2', bridge_channel: 2 },
	{ name: 'Bench 5 · mercury and argon', location: 'Room 012', heat_source_kind: 'cryostat' as const, heat_source: 'Alcohol bath and argon cryostat KV-C1', bridge: 'Ratio bridge KV-BR3', bridge_channel: 1 }
];

export const DEMO_CELLS: { serial: string; fixed_point: FixedPointCode; maker: string; immersion_depth_mm: number; purity_statement: string; purity_percent: number | null; sealed: number; notes: string }[] = [
	{ serial: 'KV-W-114', fixed_point: 'TPW', maker: 'in-house', immersion_depth_mm: 255, purity_statement: 'Ocean-water isotopic composition; degassed, sealed 2019', purity_percent: null, sealed: 1, notes: 'Reference cell for R_TPW checks' },
	{ serial: 'KV-W-121', fixed_point: 'TPW', maker: 'in-house', immersion_depth_mm: 250, purity_statement: 'Degassed, sealed 2022', purity_percent: null, sealed: 1, notes: '' },
	{ serial: 'KV-Hg-04', fixed_point: 'Hg', maker: 'in-house', immersion_depth_mm: 180, purity_statement: '99.99999 % (supplier assay)', purity_percent: 99.99999, sealed: 1, notes: 'Stainless-steel cell; mercury handling procedure applies' },
	{ serial: 'KV-Ar-01', fixed_point: 'Ar', maker: 'in-house', immersion_depth_mm: 40, purity_statement: '99.9999 % argon', purity_percent: 99.9999, sealed: 1, notes: 'Sealed cell in cryostat; liquid nitrogen cooling' },
	{ serial: 'KV-Ga-07', fixed_point: 'Ga', maker: 'in-house', immersion_depth_mm: 165, purity_statement: '99.99999 % (supplier assay)', purity_percent: 99.99999, sealed: 1, notes: '' },
	{ serial: 'KV-In-03', fixed_point: 'In', maker: 'in-house', immersion_depth_mm: 175, purity_statement: '99.99995 % (GDMS assay)', purity_percent: 99.99995, sealed: 1, notes: '' },
	{ serial: 'KV-Sn-11', fixed_point: 'Sn', maker: 'in-house', immersion_depth_mm: 180, purity_statement: '99.99995 % (GDMS assay)', purity_percent: 99.99995, sealed: 1, notes: '' },
	{ serial: 'KV-Zn-05', fixed_point: 'Zn', maker: 'in-house', immersion_depth_mm: 180, purity_statement: '99.9999 % (GDMS assay)', purity_percent: 99.9999, sealed: 1, notes: '' },
	{ serial: 'KV-Zn-09', fixed_point: 'Zn', maker: 'in-house', immersion_depth_mm: 182, purity_statement: '99.99995 % (GDMS assay)', purity_percent: 99.99995, sealed: 1, notes: 'Newer zinc cell, compared against KV-Zn-05' },
	{ serial: 'KV-Al-02', fixed_point: 'Al', maker: 'in-house', immersion_depth_mm: 175, purity_statement: '99.9999 % (GDMS assay)', purity_percent: 99.9999, sealed: 1, notes: '' },
	{ serial: 'KV-Ag-01', fixed_point: 'Ag', maker: 'in-house', immersion_depth_mm: 170, purity_statement: '99.9999 % (GDMS assay)', purity_percent: 99.9999, sealed: 1, notes: 'Used with the high-temperature SPRT only' }
];

// Each thermometer's current calibration: invented coefficients of a plausible size (|a| ~ 1e-4).
export const DEMO_THERMOMETERS = [
	{ serial: 'KV-S-4471', kind: 'SPRT' as const, maker: 'in-house stock', nominal_ohm: 25.5, r_tpw_ohm: 25.548312, notes: 'Working standard, 0 °C to 419.527 °C', subrange: 'TPW-Sn-Zn', coefficients: { a: -1.1873e-4, b: -1.0215e-5 } },
	{ serial: 'KV-S-5182', kind: 'SPRT' as const, maker: 'in-house stock', nominal_ohm: 25.5, r_tpw_ohm: 25.501947, notes: 'Reference standard, 0 °C to 660.323 °C', subrange: 'TPW-Sn-Zn-Al', coefficients: { a: -9.6410e-5, b: -1.3370e-5, c: 2.1120e-6 } },
	{ serial: 'KV-S-6020', kind: 'SPRT' as const, maker: 'in-house stock', nominal_ohm: 25.5, r_tpw_ohm: 25.613508, notes: 'Check standard, 83.8058 K to 273.16 K', subrange: 'Ar-Hg-TPW', coefficients: { a: -1.4020e-4, b: -2.3800e-5 } },
	{ serial: 'KV-H-0907', kind: 'HTSPRT' as const, maker: 'in-house stock', nominal_ohm: 2.5, r_tpw_ohm: 2.5361849, notes: 'High-temperature SPRT to 961.78 °C', subrange: 'TPW-Sn-Zn-Al-Ag', coefficients: { a: -1.6250e-4, b: -1.1900e-5, c: 1.8400e-6, d: 3.1000e-5 } }
];

export const DEMO_RESISTORS = [
	{ serial: 'KV-R25-01', nominal_ohm: 25, calibrated_ohm: 24.9999871, reference_temperature_c: 20, alpha_per_k: 1.2e-6, beta_per_k2: -4.5e-8, bath_temperature_c: 20.0, notes: 'In the oil bath at 20 °C' },
	{ serial: 'KV-R100-02', nominal_ohm: 100, calibrated_ohm: 100.000183, reference_temperature_c: 20, alpha_per_k: 0.8e-6, beta_per_k2: -3.0e-8, bath_temperature_c: 20.0, notes: 'In the oil bath at 20 °C' },
	{ serial: 'KV-R10-03', nominal_ohm: 10, calibrated_ohm: 9.9999942, reference_temperature_c: 20, alpha_per_k: 1.0e-6, beta_per_k2: -4.0e-8, bath_temperature_c: 20.0, notes: 'For the high-temperature SPRT' }
];
