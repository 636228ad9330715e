import { describe, expect, it } from 'vitest';
import { isCompleteNumber, keyFromKeyboard, pressKey, pressPinKey, type PadKey, type PadRules } from './keypad-input';

const rules: PadRules = { allowDecimal: true, allowNegative: true, maxLength: 6 };
const type = (keys: PadKey[], r = rules) => keys.reduce((v, k) => pressKey(v, k, r), '');

// Expected values: Benchstamp's keypad behaviour as specified in the component brief (calculator-style entry).
describe('pressKey', () => {
	it.each<[PadKey[], string]>([
		[['1', '.', '2', '5'], '1.25'],
		[['.', '5'], '0.5'],
		[['0', '7'], '7'],
		[['0', '.', '0', '5'], '0.05'],
		[['1', '.', '.', '2'], '1.2'],
		[['sign', '3'], '-3'],
		[['3', 'sign', 'sign'], '3'],
		[['1', '2', 'back'], '1'],
		[['sign', '1', 'back'], '-'],
		[['sign', 'back'], ''],
		[['1', '2', 'clear'], ''],
		[['1', '2', '3', '4', '5', '6', '7'], '123456'],
		[['1', '2', '3', '4', '5', '.'], '12345'],
		[['sign', '1', '2', '3', '4', '5', '6'], '-123456']
	])('%j → %s', (keys, expected) => {
		expect(type(keys)).toBe(expected);
	});

	it('ignores decimal point and sign when not allowed', () => {
		const r = { allowDecimal: false, allowNegative: false, maxLength: 4 };
		expect(type(['1', '.', 'sign', '5'], r)).toBe('15');
	});
});

it.each([
	['5', true],
	['-0.25', true],
	['5.', true],
	['', false],
	['-', false]
])('isCompleteNumber(%j) is %s', (value, expected) => expect(isCompleteNumber(value)).toBe(expected));

describe('keyFromKeyboard', () => {
	it.each([
		['7', '7'],
		[',', '.'],
		['-', 'sign'],
		['Backspace', 'back'],
		['Escape', 'clear'],
		['Enter', null],
		['a', null]
	])('%s → %s', (key, expected) => expect(keyFromKeyboard(key)).toBe(expected));
});

describe('pressPinKey', () => {
	it('takes digits up to the maximum and nothing else', () => {
		const keys: PadKey[] = ['1', '.', '2', '3', 'sign', '4', '5', '6', '7', '8', '9'];
		expect(keys.reduce((p, k) => pressPinKey(p, k, 8), '')).toBe('12345678');
		expect(pressPinKey('123', 'back', 8)).toBe('12');
		expect(pressPinKey('123', 'clear', 8)).toBe('');
	});
});
