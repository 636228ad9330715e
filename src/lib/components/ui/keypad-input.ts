/** What a numeric keypad key does to the text being typed. Pure, so it is tested without a DOM. */

export type PadKey = '0' | '1' | '2' | '3' | '4' | '5' | '6' | '7' | '8' | '9' | '.' | 'sign' | 'back' | 'clear';

export interface PadRules {
	allowDecimal: boolean;
	allowNegative: boolean;
	/** Maximum count of digits and decimal point, not counting a leading minus. */
	maxLength: number;
}

const DIGIT = /^[0-9]$/;

/** Applies one key press; returns the value unchanged when the key is not allowed there. */
export function pressKey(value: string, key: PadKey, rules: PadRules): string {
	const negative = value.startsWith('-');
	const body = negative ? value.slice(1) : value;
	const sign = negative ? '-' : '';

	switch (key) {
		case 'clear':
			return '';
		case 'back':
			return body === '' ? '' : sign + body.slice(0, -1);
		case 'sign':
			if (!rules.allowNegative) return value;
			return negative ? body : '-' + body;
		case '.':
			if (!rules.allowDecimal || body.includes('.') || body.length + 2 > rules.maxLength) return value;
			return sign + (body === '' ? '0.' : body + '.');
		default:
			if (!DIGIT.test(key) || body.length >= rules.maxLength) return value;
			// No leading zeros: "0" then "7" reads "7", not "07".
			return sign + (body === '0' ? key : body + key);
	}
}

/** True when the text is a number worth submitting ("5." counts; "", "-" do not). */
export function isCompleteNumber(value: string): boolean {
	return /^-?[0-9]+\.?[0-9]*$/.test(value);
}

/** Maps a physical key (KeyboardEvent.key) to a pad key, or null. Enter is left to the focused button. */
export function keyFromKeyboard(key: string): PadKey | null {
	if (DIGIT.test(key)) return key as PadKey;
	if (key === '.' || key === ',') return '.';
	if (key === '-') return 'sign';
	if (key === 'Backspace') return 'back';
	if (key === 'Escape' || key === 'Delete') return 'clear';
	return null;
}

/** Appends a PIN digit up to `max`; PINs are digits only. */
export function pressPinKey(pin: string, key: PadKey, max: number): string {
	if (key === 'clear') return '';
	if (key === 'back') return pin.slice(0, -1);
	return DIGIT.test(key) && pin.length < max ? pin + key : pin;
}
