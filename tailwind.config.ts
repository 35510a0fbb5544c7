// Design tokens for Spotface. Loaded from src/app.css with @config.
// Colours are chosen for daylight readability on a tablet: high contrast, no pastel-only cues.
export default {
	content: ['./src/**/*.{html,svelte,ts}'],
	theme: {
		extend: {
			colors: {
				ink: { DEFAULT: '#17202a', soft: '#3d4a57', faint: '#5d6976' },
				paper: { DEFAULT: '#ffffff', dim: '#f3f5f7', line: '#d5dbe1' },
				brand: { DEFAULT: '#1f5f8b', dark: '#174a6c', light: '#e3eef6' },
				ok: { DEFAULT: '#1d7a3e', light: '#e2f3e8' },
				caution: { DEFAULT: '#8a5a00', light: '#fdf1d6' },
				stop: { DEFAULT: '#b3261e', light: '#fbe5e3' }
			},
			fontFamily: {
				sans: ['Figtree', 'system-ui', 'sans-serif']
			}
		}
	}
};
