import forms from '@tailwindcss/forms';
import type { Config } from 'tailwindcss';

// Mendwise's own palette: graphite ink on warm paper, a copper accent for actions and a
// moss green for good news. Amber and brick carry cautions and problems.
export default {
	content: ['./src/**/*.{html,svelte,ts,js}'],
	theme: {
		extend: {
			fontFamily: {
				sans: ['Inter', 'system-ui', 'sans-serif']
			},
			colors: {
				paper: '#f6f3ec',
				ink: { DEFAULT: '#1f2a30', soft: '#47555d', faint: '#5f6b71' },
				copper: { DEFAULT: '#a64b24', dark: '#7f3719', light: '#f3dfd2' },
				moss: { DEFAULT: '#3d6b4f', light: '#dcebdf' },
				amber: { DEFAULT: '#9a6a00', light: '#fbefcf' },
				brick: { DEFAULT: '#a12f2f', light: '#f7dcdc' }
			}
		}
	},
	plugins: [forms]
} satisfies Config;
