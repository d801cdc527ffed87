// Every equation the metrology core uses, with its source, for the "about the calculations" page.
// provenance: 'published' (read in a stored copy of the source), 'memory' (from memory, cross-checked
// as the note says), 'common practice' (a fact of the trade with no single source).

export type Provenance = 'published' | 'memory' | 'common practice';

export interface EquationEntry {
	id: string;
	title: string;
	/** plain text / Unicode maths */
	formula: string;
	source: string;
	provenance: Provenance;
	note?: string;
	/** module implementing it */
	module: string;
}

const ITS90 = 'H. Preston-Thomas, "The International Temperature Scale of 1990 (ITS-90)", Metrologia 27, 3–10 (1990); erratum Metrologia 27, 107 (1990)';
const GUM = 'JCGM 100:2008 (GUM), Evaluation of measurement data — Guide to the expression of uncertainty in measurement';
const CRC = 'CRC Handbook of Chemistry and Physics, 95th ed. (2014), "Heat of fusion"';

export const EQUATIONS: readonly EquationEntry[] = Object.freeze([
	{
		id: 'its90-9a',
		title: 'Reference function, 13.8033 K to 273.16 K',
		formula: 'ln W_r(T90) = A₀ + Σᵢ₌₁¹² Aᵢ [ (ln(T90 / 273.16 K) + 1.5) / 1.5 ]ⁱ',
		source: `ITS-90 Eq. (9a), coefficients Table 4; ${ITS90}`,
		provenance: 'memory',
		note: 'Coefficients from memory, digit-checked against Table 1 (every W_r reproduced within 5e-9). Used below 273.16 K; 0.5 K margin below 13.8033 K. The Aᵢ sum to −1e-8, so W_r(273.16 K) = 0.99999999.',
		module: 'reference-function.ts'
	},
	{
		id: 'its90-9b',
		title: 'Inverse reference function, 13.8033 K to 273.16 K',
		formula: 'T90 / 273.16 K = B₀ + Σᵢ₌₁¹⁵ Bᵢ [ (W_r^(1/6) − 0.65) / 0.35 ]ⁱ',
		source: `ITS-90 Eq. (9b), coefficients Table 4; ${ITS90}`,
		provenance: 'memory',
		note: 'Equivalent to 9a within 0.1 mK; used only as the starting value of Newton steps on 9a.',
		module: 'reference-function.ts'
	},
	{
		id: 'its90-10a',
		title: 'Reference function, 273.15 K to 1234.93 K',
		formula: 'W_r(T90) = C₀ + Σᵢ₌₁⁹ Cᵢ [ (T90 / K − 754.15) / 481 ]ⁱ',
		source: `ITS-90 Eq. (10a), coefficients Table 4; ${ITS90}`,
		provenance: 'memory',
		note: 'Used at and above 273.16 K; 5 K margin above 1234.93 K.',
		module: 'reference-function.ts'
	},
	{
		id: 'its90-10b',
		title: 'Inverse reference function, 273.15 K to 1234.93 K',
		formula: 'T90 / K − 273.15 = D₀ + Σᵢ₌₁⁹ Dᵢ [ (W_r − 2.64) / 1.64 ]ⁱ',
		source: `ITS-90 Eq. (10b), coefficients Table 4; ${ITS90}`,
		provenance: 'memory',
		note: 'Equivalent to 10a within 0.13 mK; used only as the starting value of Newton steps on 10a.',
		module: 'reference-function.ts'
	},
	{
		id: 'newton-inverse',
		title: 'Refined inverse of the reference function',
		formula: 'T ← T − (W_r(T) − W_r,measured) / (dW_r/dT), from the 9b/10b value until |ΔT| < 1e-11·T',
		source: 'Newton–Raphson iteration on Eq. (9a)/(10a); the refinement itself is common practice',
		provenance: 'common practice',
		note: 'Round trip T → W_r → T better than 1 µK (tested).',
		module: 'reference-function.ts'
	},
	{
		id: 'ratio',
		title: 'Resistance ratio',
		formula: 'W(T90) = R(T90) / R(273.16 K)',
		source: `ITS-90 section 3.3; ${ITS90}`,
		provenance: 'memory',
		module: 'reduction.ts'
	},
	{
		id: 'deviation-ar-hg',
		title: 'Deviation function, 83.8058 K to 273.16 K (Ar, Hg, TPW)',
		formula: 'W − W_r = ΔW = a(W − 1) + b(W − 1) ln W',
		source: `ITS-90 section 3.3.1.3 and Table 5; ${ITS90}`,
		provenance: 'memory',
		module: 'deviation.ts'
	},
	{
		id: 'deviation-hg-ga',
		title: 'Deviation function, 234.3156 K to 302.9146 K (Hg, TPW, Ga)',
		formula: 'ΔW = a(W − 1) + b(W − 1)²',
		source: `ITS-90 section 3.3.3 and Table 5; ${ITS90}`,
		provenance: 'memory',
		module: 'deviation.ts'
	},
	{
		id: 'deviation-above-0c',
		title: 'Deviation functions from 273.15 K (sub-ranges ending at Ga, In, Sn, Zn, Al, Ag)',
		formula: 'ΔW = a(W − 1) + b(W − 1)² + c(W − 1)³ + d[W − W(660.323 °C)]²; Ag range: a, b, c, d; Al: a, b, c; Zn and Sn: a, b; In and Ga: a',
		source: `ITS-90 sections 3.3.2 and 3.3.2.1–3.3.2.5, Table 5; ${ITS90}`,
		provenance: 'memory',
		note: 'The d-term uses the thermometer\'s own W at the Al point and applies only above it; a, b, c keep the values found from TPW, Sn, Zn, Al, then d is found from Ag (Table 5 footnote, cross-checked in the copy of Table 5 at its-90.com, reproduced with permission of Metrologia).',
		module: 'deviation.ts'
	},
	{
		id: 'deviation-fit',
		title: 'Deviation coefficients from the calibration points',
		formula: 'W_i − W_r(T90,i) = ΔW(W_i) at each calibration point i: an n×n linear system (Gaussian elimination, partial pivoting)',
		source: `ITS-90 section 3.3 (the function passes through every calibration point); ${ITS90}`,
		provenance: 'memory',
		module: 'deviation.ts'
	},
	{
		id: 'temperature-from-w',
		title: 'Temperature from the thermometer\'s W',
		formula: 'W_r = W − ΔW(W);  T90 = T_r(W_r)',
		source: `ITS-90 section 3.3; ${ITS90}`,
		provenance: 'memory',
		note: 'Readings up to 5 K beyond a sub-range are reduced (extrapolation, for approach and plateau display); further out the call fails.',
		module: 'deviation.ts'
	},
	{
		id: 'sensitivity',
		title: 'Sensitivity of T90 to W and to the bridge ratio',
		formula: 'dT/dW = (1 − dΔW/dW) / (dW_r/dT);  dT/d(ratio) = dT/dW × R_s / R_TPW',
		source: 'Differentiation of the above (chain rule)',
		provenance: 'common practice',
		note: 'dW_r/dT at 273.16 K = 3.98853e-3 /K (its90-data.md).',
		module: 'deviation.ts, bridge.ts'
	},
	{
		id: 'bridge',
		title: 'Bridge reduction with the standard resistor\'s temperature coefficients',
		formula: 'R = ratio × R_s(t),  R_s(t) = R_s,cal [1 + α(t − t₀) + β(t − t₀)²]',
		source: 'Resistance-ratio bridge practice; α, β and t₀ from the resistor\'s certificate',
		provenance: 'common practice',
		module: 'bridge.ts'
	},
	{
		id: 'self-heating-two-currents',
		title: 'Zero-current resistance from two currents',
		formula: 'R(0) = (R₁ I₂² − R₂ I₁²) / (I₂² − I₁²);  with I₂ = √2 I₁: R(0) = 2 R(I) − R(√2 I)',
		source: 'Self-heating proportional to I² (its90-data.md, "Other relations")',
		provenance: 'common practice',
		module: 'self-heating.ts'
	},
	{
		id: 'self-heating-fit',
		title: 'Zero-current resistance from many currents',
		formula: 'R = R(0) + s I² by least squares; u(R(0)) = s_res √(1/n + x̄² / Σ(xᵢ − x̄)²), x = I², s_res² = Σ residual² / (n − 2)',
		source: 'Ordinary least squares, standard error of the intercept',
		provenance: 'common practice',
		module: 'self-heating.ts'
	},
	{
		id: 'self-heating-kelvin',
		title: 'Self-heating as a temperature',
		formula: 'ΔT_SH = (R(I) − R(0)) / R_TPW × dT/dW',
		source: 'Chain rule on W = R/R_TPW',
		provenance: 'common practice',
		module: 'self-heating.ts'
	},
	{
		id: 'hydrostatic',
		title: 'Hydrostatic-head correction',
		formula: 'ΔT_h = (dT/dl) × h,  h = depth of the sensor\'s mid-point below the free surface',
		source: `ITS-90 Table 2; ${ITS90}`,
		provenance: 'published',
		note: 'Negative for water and gallium (their melting temperature falls with pressure).',
		module: 'corrections.ts'
	},
	{
		id: 'pressure',
		title: 'Pressure correction (melting and freezing points)',
		formula: 'ΔT_p = (dT/dp) × (p − 101 325 Pa); 0 for triple points',
		source: `ITS-90 Table 2; ${ITS90}. Checked against E. H. McLaren, Can. J. Phys. (1957–58): Zn 4.3, Sn 3.3, In 4.9 mK/atm`,
		provenance: 'published',
		module: 'corrections.ts'
	},
	{
		id: 'expected-sensor',
		title: 'What a perfect sensor reads in the cell',
		formula: 'T_sensor = T90 + ΔT_p + ΔT_h;  deviation from the assigned value = T90,measured − T_sensor',
		source: `ITS-90 Table 2 notes; ${ITS90}`,
		provenance: 'published',
		module: 'corrections.ts, reduction.ts'
	},
	{
		id: 'cryoscopic-constant',
		title: 'First cryoscopic constant',
		formula: 'A = L / (R T²),  R = 8.314462618 J mol⁻¹ K⁻¹',
		source: `Dilute-solution thermodynamics; L from ${CRC} (Ar: 1.18 kJ/mol, from memory); R: CODATA (exact since the 2019 SI)`,
		provenance: 'published',
		note: 'Indium checked against adiabatic calorimetry 28.6624 J/g (J. Chem. Eng. Data 48, 1157 (2003)) × 114.818 g/mol (IUPAC standard atomic weight) = 3.2910 kJ/mol.',
		module: 'fixed-points.ts'
	},
	{
		id: 'raoult',
		title: 'Raoult\'s law (impurity insoluble in the solid)',
		formula: 'T(F) = T_pure − (c / A)(1 / F);  slope of T against 1/F = −c / A',
		source: 'Raoult\'s law for dilute solutions (its90-data.md, "Other relations")',
		provenance: 'common practice',
		module: 'impurity.ts'
	},
	{
		id: 'ome',
		title: 'Overall maximum estimate of the impurity depression',
		formula: 'ΔT_OME = c_total / A;  per µmol/mol: 10⁻⁶ / A',
		source: 'OME method (its90-data.md, "Other relations")',
		provenance: 'common practice',
		module: 'impurity.ts'
	},
	{
		id: 'purity',
		title: 'Nominal purity to impurity',
		formula: 'c = (100 − purity %) / 100;  "six nines" 99.9999 % → 1 µmol/mol',
		source: 'Trade usage of "N nines" purity',
		provenance: 'common practice',
		module: 'impurity.ts'
	},
	{
		id: 'gum-standard-uncertainty',
		title: 'Standard uncertainty of a component',
		formula: 'u = value / divisor: normal 1 (or the quoted k), rectangular √3, triangular √6, U-shaped √2 (value = half-width)',
		source: `${GUM}, 4.3.7–4.3.9`,
		provenance: 'memory',
		module: 'uncertainty.ts'
	},
	{
		id: 'gum-combined',
		title: 'Combined standard uncertainty (uncorrelated inputs)',
		formula: 'u_c = √( Σ (cᵢ uᵢ)² )',
		source: `${GUM}, Eq. (10)`,
		provenance: 'memory',
		module: 'uncertainty.ts'
	},
	{
		id: 'welch-satterthwaite',
		title: 'Effective degrees of freedom',
		formula: 'ν_eff = u_c⁴ / Σ ( (cᵢ uᵢ)⁴ / νᵢ )',
		source: `${GUM}, Eq. (G.2b)`,
		provenance: 'memory',
		module: 'uncertainty.ts'
	},
	{
		id: 'expanded',
		title: 'Expanded uncertainty',
		formula: 'U = k u_c,  k = 2 by default, or k = t_p(ν_eff) (two-sided Student t, ν_eff truncated to an integer)',
		source: `${GUM}, 6.2 and Annex G (G.4, G.6.4)`,
		provenance: 'memory',
		module: 'uncertainty.ts, student-t.ts'
	},
	{
		id: 'rtpw-stability',
		title: 'Equivalent temperature of an R_TPW change',
		formula: 'ΔT = ΔR_TPW / (R_TPW × 3.98853e-3 K⁻¹)',
		source: 'NIST practice, Minor & Strouse, NCSLI 2005 (limit 0.2 mK after a stabilisation cycle)',
		provenance: 'published',
		module: 'reference-function.ts (dW_r/dT)'
	}
] satisfies EquationEntry[]);
