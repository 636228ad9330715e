import js from '@eslint/js';
import svelte from 'eslint-plugin-svelte';
import globals from 'globals';
import ts from 'typescript-eslint';
import svelteConfig from './svelte.config.js';

/** The domain is a library: these folders run in the browser, on the server and under plain Node alike. */
const pureDomain = ['src/lib/procedure/**', 'src/lib/checks/**', 'src/lib/ledger/**', 'src/lib/signing/**'];

export default ts.config(
	{
		ignores: [
			'build/',
			'.svelte-kit/',
			'.*-build/',
			'.*-kit/',
			'node_modules/',
			'.data/',
			'test-results/',
			'playwright-report/'
		]
	},
	js.configs.recommended,
	...ts.configs.recommended,
	...svelte.configs.recommended,
	{
		languageOptions: { globals: { ...globals.browser, ...globals.node } },
		rules: {
			'@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
			// SvelteKit's own `resolve()` helper is optional; plain paths are fine in this app.
			'svelte/no-navigation-without-resolve': 'off'
		}
	},
	{
		files: ['**/*.svelte', '**/*.svelte.ts', '**/*.svelte.js'],
		languageOptions: {
			parserOptions: { projectService: true, extraFileExtensions: ['.svelte'], parser: ts.parser, svelteConfig }
		}
	},
	{
		files: pureDomain,
		rules: {
			'no-restricted-imports': [
				'error',
				{
					patterns: [
						{
							group: [
								'$app/*',
								'$env/*',
								'svelte',
								'svelte/*',
								'@sveltejs/*',
								'@mikro-orm/*',
								'$lib/server/*',
								'$lib/client/*',
								'$lib/components/*'
							],
							message: 'The domain library imports no framework, database or UI code.'
						},
						{ group: ['node:*'], message: 'The domain library runs in the browser too: no Node built-ins.' }
					]
				}
			]
		}
	}
);
