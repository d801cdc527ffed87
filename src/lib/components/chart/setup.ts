// Chart.js, its plugins and the date-fns time adapter, registered once per page load. Imported only in
// the browser (the zoom plugin touches `window` when it loads).
import { Chart, registerables } from 'chart.js';
import zoomPlugin from 'chartjs-plugin-zoom';
import 'chartjs-adapter-date-fns';

let registered = false;

export function chartClass(): typeof Chart {
	if (!registered) {
		// registerables includes the Decimation plugin; zoom adds wheel/pinch zoom and drag pan.
		Chart.register(...registerables, zoomPlugin);
		registered = true;
	}
	return Chart;
}
