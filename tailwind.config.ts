import type { Config } from 'tailwindcss';

// Stillpoint's theme tokens. Colours are CSS variables (set per theme in src/app.css) so one class
// serves the light and the dark bench monitor alike.
const token = (name: string) => `var(--sp-${name})`;

export default {
	content: ['./src/**/*.{html,js,svelte,ts}'],
	theme: {
		extend: {
			colors: {
				ground: token('ground'),
				panel: token('panel'),
				'panel-raised': token('panel-raised'),
				ink: token('ink'),
				muted: token('muted'),
				line: token('line'),
				steady: token('steady'),
				'steady-soft': token('steady-soft'),
				caution: token('caution'),
				'caution-soft': token('caution-soft'),
				fault: token('fault'),
				'fault-soft': token('fault-soft'),
				signal: token('signal')
			},
			fontFamily: {
				ui: ['"Atkinson Hyperlegible"', 'system-ui', 'sans-serif'],
				num: ['"JetBrains Mono"', 'ui-monospace', 'monospace']
			},
			fontSize: {
				// Bench-monitor sizes: readable from two metres.
				reading: ['2.75rem', { lineHeight: '1', letterSpacing: '-0.02em' }],
				gauge: ['1.5rem', { lineHeight: '1.1' }]
			},
			borderRadius: {
				plate: '0.35rem'
			}
		}
	}
} satisfies Config;
