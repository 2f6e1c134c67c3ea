import js from '@eslint/js';
import svelte from 'eslint-plugin-svelte';
import globals from 'globals';
import ts from 'typescript-eslint';
import svelteConfig from './svelte.config.js';

export default ts.config(
	js.configs.recommended,
	...ts.configs.recommended,
	...svelte.configs.recommended,
	{ languageOptions: { globals: { ...globals.browser, ...globals.node } } },
	{
		files: ['**/*.svelte', '**/*.svelte.ts'],
		languageOptions: {
			parserOptions: {
				projectService: true,
				extraFileExtensions: ['.svelte'],
				parser: ts.parser,
				svelteConfig
			}
		}
	},
	{
		rules: {
			'@typescript-eslint/no-unused-vars': [
				'error',
				{ argsIgnorePattern: '^_', varsIgnorePattern: '^_' }
			],
			'svelte/no-navigation-without-resolve': 'off'
		}
	},
	{
		// Migrations are written against Kysely<any> on purpose: they are frozen in time and must not
		// follow later changes to the Database interface.
		files: ['migrations/**/*.ts'],
		rules: { '@typescript-eslint/no-explicit-any': 'off' }
	},
	{
		// Building a link from the current URL's parameters is not reactive state.
		files: ['src/lib/components/Pagination.svelte', 'src/lib/components/SortHeader.svelte'],
		rules: { 'svelte/prefer-svelte-reactivity': 'off' }
	},
	{
		ignores: [
			'build/',
			'**/.svelte-kit/',
			'.svelte-kit/',
			'node_modules/',
			'data/',
			'test-results/',
			'playwright-report/'
		]
	}
);
