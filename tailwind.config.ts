import type { Config } from 'tailwindcss';

// Castellan's look: calm steel greys, one warm accent (forge amber). States always pair a word and
// a shape with any colour, so colour is never the only carrier of meaning.
export default {
	content: ['./src/**/*.{html,js,svelte,ts}'],
	theme: {
		extend: {
			colors: {
				steel: {
					50: '#f5f7f8',
					100: '#e9edf0',
					200: '#d3dae0',
					300: '#b1bcc6',
					400: '#8896a4',
					500: '#5c6a7b',
					600: '#546171',
					700: '#454f5c',
					800: '#3b434e',
					900: '#2b3139',
					950: '#1b1f25'
				},
				ember: {
					50: '#fff7ed',
					100: '#ffedd5',
					200: '#fed7aa',
					300: '#fdba74',
					400: '#fb923c',
					500: '#e8711c',
					600: '#c85a12',
					700: '#a24412',
					800: '#833816',
					900: '#6b3015'
				}
			},
			fontFamily: {
				sans: ['"Inter Variable"', 'system-ui', 'sans-serif'],
				mono: ['"JetBrains Mono Variable"', 'ui-monospace', 'monospace']
			}
		}
	}
} satisfies Config;
