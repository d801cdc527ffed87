// The safety notes shown where a run is set up. Common practice of fixed-point laboratories, in our
// own words; they do not replace the laboratory's own risk assessment and procedures.
import type { FixedPointId } from './metrology/index';

export interface Caution {
	hazard: 'mercury' | 'cryogen' | 'hot' | 'very-hot' | 'glass' | 'thermometer';
	title: string;
	text: string;
}

const MERCURY: Caution = {
	hazard: 'mercury',
	title: 'Mercury',
	text: 'The cell holds liquid mercury. Keep it sealed and upright in its carrier, work over a tray, keep the spill kit at the bench, and never heat a cracked or weeping cell. Dispose of mercury and anything it touched as hazardous waste under local regulations.'
};
const CRYOGEN: Caution = {
	hazard: 'cryogen',
	title: 'Cryogens',
	text: 'Liquid nitrogen (and dry ice or cold rods for mantles) cause cold burns and, in a small room, oxygen depletion. Wear a face shield and cryogenic gloves, keep the room ventilated and the oxygen monitor on, and never close a vessel that holds a cryogen.'
};
const HOT: Caution = {
	hazard: 'hot',
	title: 'Hot furnace and thermometer',
	text: 'The furnace, the cell and an SPRT just withdrawn from it are hot enough to burn. Use heat-resistant gloves, withdraw the thermometer slowly into a preheated holder (thermal shock changes its resistance), and keep the area around the furnace clear.'
};
const VERY_HOT: Caution = {
	hazard: 'very-hot',
	title: 'Furnace near 1000 °C',
	text: 'Surfaces, the furnace opening and the withdrawn thermometer are far above ignition temperatures of common materials. Use long gloves and a face shield when opening the furnace, keep flammables away, and follow the furnace’s own interlock and cooling procedure.'
};
const GLASS: Caution = {
	hazard: 'glass',
	title: 'Glass cell',
	text: 'The cell is glass under partial vacuum. Inspect it for cracks before use and handle it in its holder; a broken cell can implode.'
};

/** Cautions for a realization of this fixed point, most severe first. */
export function cautionsFor(point: FixedPointId): Caution[] {
	switch (point) {
		case 'Hg':
			return [MERCURY, CRYOGEN];
		case 'Ar':
			return [CRYOGEN];
		case 'TPW':
			return [CRYOGEN, GLASS];
		case 'Ga':
			return [
				{ hazard: 'glass', title: 'Gallium expands on freezing', text: 'Gallium grows by about 3 % when it freezes: never let a cell freeze solid unless it is made for it, and keep it upright in its bath.' }
			];
		case 'In':
		case 'Sn':
		case 'Zn':
			return [HOT];
		case 'Al':
			return [VERY_HOT, HOT];
		case 'Ag':
			return [
				VERY_HOT,
				HOT,
				{ hazard: 'thermometer', title: 'High-temperature SPRT only', text: 'Use a high-temperature SPRT at the silver point; a standard SPRT is damaged far above the aluminium point.' }
			];
	}
}

export const REVIEW_NOTE = 'Results are for review under the laboratory’s own quality system and local regulations.';
