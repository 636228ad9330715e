/**
 * Benchstamp's own icon shapes: 24×24 grid, stroked with currentColor (round caps), so one list of path data
 * draws every icon. Dots are zero-length strokes ("h.01").
 */
export const icons = {
	check: ['M4.5 12.5l5 5L19.5 7'],
	cross: ['M6 6l12 12', 'M18 6L6 18'],
	warning: ['M12 3.5L21.5 20h-19z', 'M12 9.5v4.5', 'M12 17h.01'],
	caution: ['M12 3a9 9 0 1 0 0 18a9 9 0 1 0 0-18z', 'M12 7v6', 'M12 16.5h.01'],
	info: ['M12 3a9 9 0 1 0 0 18a9 9 0 1 0 0-18z', 'M12 11v6', 'M12 7.5h.01'],
	pending: ['M12 4a8 8 0 1 0 0 16a8 8 0 1 0 0-16z'],
	clock: ['M12 3a9 9 0 1 0 0 18a9 9 0 1 0 0-18z', 'M12 7.5V12l3 2'],
	backspace: ['M9 5h11a1 1 0 0 1 1 1v12a1 1 0 0 1-1 1H9l-6-7z', 'M12 9l5 6', 'M17 9l-5 6'],
	enter: ['M19 5v8H6', 'M10 9l-4 4l4 4'],
	plus: ['M12 5v14', 'M5 12h14'],
	minus: ['M5 12h14'],
	'plus-minus': ['M12 4v9', 'M7.5 8.5h9', 'M7.5 19h9'],
	'chevron-down': ['M6 9l6 6l6-6'],
	'chevron-right': ['M9 6l6 6l-6 6'],
	sun: [
		'M12 8a4 4 0 1 0 0 8a4 4 0 1 0 0-8z',
		'M12 2.5v2',
		'M12 19.5v2',
		'M2.5 12h2',
		'M19.5 12h2',
		'M5.3 5.3l1.4 1.4',
		'M17.3 17.3l1.4 1.4',
		'M5.3 18.7l1.4-1.4',
		'M17.3 6.7l1.4-1.4'
	],
	moon: ['M20 14.5A8.5 8.5 0 1 1 9.5 4a6.8 6.8 0 0 0 10.5 10.5z'],
	monitor: [
		'M4.5 4h15a1.5 1.5 0 0 1 1.5 1.5v9a1.5 1.5 0 0 1-1.5 1.5h-15A1.5 1.5 0 0 1 3 14.5v-9A1.5 1.5 0 0 1 4.5 4z',
		'M8 20h8',
		'M12 16v4'
	],
	'sign-out': ['M10 4H5v16h5', 'M9.5 12H20', 'M16 8l4 4l-4 4'],
	user: ['M12 4a4 4 0 1 0 0 8a4 4 0 1 0 0-8z', 'M4 20.5c.5-4 3.8-6 8-6s7.5 2 8 6'],
	home: ['M3.5 11L12 4l8.5 7', 'M6 9.5V20h12V9.5', 'M10 20v-5h4v5'],
	procedure: ['M6 3h9l4 4v14H6z', 'M15 3v4h4', 'M9 12h7', 'M9 16h7'],
	run: ['M8 4h8v3H8z', 'M6 5.5H5v15.5h14V5.5h-1', 'M8.5 13.5l2.5 2.5l4.5-5'],
	audit: ['M10.5 4a6.5 6.5 0 1 0 0 13a6.5 6.5 0 1 0 0-13z', 'M15.5 15.5L21 21', 'M8 10.5l2 2l3-3.5'],
	wrench: ['M14.5 3.5a4.5 4.5 0 0 0-4.2 6.1L3.5 16.4l4.1 4.1l6.8-6.8a4.5 4.5 0 0 0 6.1-4.2l-2.8 2.8l-2.7-.7l-.7-2.7z'],
	lock: ['M6 10.5h12v10H6z', 'M8.5 10.5V8a3.5 3.5 0 0 1 7 0v2.5', 'M12 14.5v2'],
	menu: ['M4 6.5h16', 'M4 12h16', 'M4 17.5h16'],
	search: ['M10.5 4a6.5 6.5 0 1 0 0 13a6.5 6.5 0 1 0 0-13z', 'M15.5 15.5L21 21']
} as const satisfies Record<string, readonly string[]>;

export type IconName = keyof typeof icons;

export const isIconName = (name: string): name is IconName => Object.hasOwn(icons, name);
