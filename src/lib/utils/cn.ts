import { clsx, type ClassValue } from 'clsx';
import { extendTailwindMerge } from 'tailwind-merge';
import { createTV } from 'tailwind-variants';
import { tokenKeys } from '$lib/design/tokens';

// Teach tailwind-merge our token names: otherwise `text-bench-base` is taken for a colour and dropped when
// merged with `text-fg`.
const twMergeConfig = {
	extend: {
		theme: {
			color: tokenKeys.color,
			text: tokenKeys.text,
			spacing: tokenKeys.spacing,
			radius: tokenKeys.radius
		}
	}
};

const twMerge = extendTailwindMerge(twMergeConfig);

/** Joins class values (clsx) and lets later Tailwind classes win over earlier conflicting ones. */
export function cn(...inputs: ClassValue[]): string {
	return twMerge(clsx(inputs));
}

/** tailwind-variants, with the same merge rules as `cn`. Use this `tv`, not the package's. */
export const tv = createTV({ twMergeConfig });

export type { VariantProps } from 'tailwind-variants';
