import { describe, expect, it } from 'vitest';
import { mayKeepPage, pagesToKeep, strategyFor, type RequestFacts } from './strategy';

const assets = new Set(['/_app/immutable/entry/start.abc123.js', '/manifest.webmanifest', '/offline.html']);
const get = (pathname: string, over: Partial<RequestFacts> = {}): RequestFacts => ({
	method: 'GET',
	sameOrigin: true,
	pathname,
	navigate: false,
	...over
});

describe('service worker strategy', () => {
	it.each([
		['an immutable build asset', get('/_app/immutable/entry/start.abc123.js'), 'cache-first'],
		['the manifest', get('/manifest.webmanifest'), 'cache-first'],
		['a page', get('/runs/0190', { navigate: true }), 'network-first'],
		['any other page', get('/quality', { navigate: true }), 'network-first'],
		['a JSON GET', get('/api/runs/0190/records'), 'pass'],
		['a navigation to an API URL', get('/api/audit/held', { navigate: true }), 'pass'],
		['a record POST', get('/api/runs/0190/records', { method: 'POST' }), 'pass'],
		['a form action POST', get('/bench/devices', { method: 'POST', navigate: true }), 'pass'],
		['a photo', get('/images/0190'), 'pass'],
		['another origin', get('/_app/immutable/entry/start.abc123.js', { sameOrigin: false }), 'pass'],
		['sign-out', get('/signout', { method: 'POST', navigate: true }), 'forget-pages']
	])('%s → %s', (_what, facts, expected) => {
		expect(strategyFor(facts, assets)).toBe(expected);
	});

	it.each([
		['/bench', 200, 'text/html; charset=utf-8', true],
		['/runs/0190', 200, 'text/html', true],
		['/runs/0190', 500, 'text/html', false],
		['/runs/0190', 200, 'application/json', false],
		['/quality/held', 200, 'text/html', false],
		['/benchmarks', 200, 'text/html', false]
	])('keeps %s (%i, %s) for offline: %s', (path, status, type, expected) => {
		expect(mayKeepPage(path, status, type)).toBe(expected);
	});
});

describe('pages a keep-pages message may fetch', () => {
	const origin = 'https://bench.kestrel.local';
	it('keeps runner and bench pages of this origin, by path, once each', () => {
		const urls = ['/runs/0190?x=1', `${origin}/runs/0190#step`, '/bench', '/bench/devices'];
		expect(pagesToKeep({ type: 'keep-pages', urls }, origin)).toEqual([
			`${origin}/runs/0190`,
			`${origin}/bench`,
			`${origin}/bench/devices`
		]);
	});
	it.each([
		['another origin', { type: 'keep-pages', urls: ['https://elsewhere.example/runs/0190'] }],
		['a page that is not kept offline', { type: 'keep-pages', urls: ['/quality/held', '/api/runs/0190/runner'] }],
		['another message', { type: 'skip-waiting', urls: ['/runs/0190'] }],
		['no list', { type: 'keep-pages', urls: '/runs/0190' }],
		['nothing', null]
	])('%s → nothing', (_what, message) => {
		expect(pagesToKeep(message, origin)).toEqual([]);
	});
});
