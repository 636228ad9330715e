import { tv } from '$lib/utils/cn';

/** Shared look of Input and Select: the control, its label, hint and error text. */
export const field = tv({
	slots: {
		root: 'flex flex-col gap-1.5',
		label: 'font-bold text-fg',
		control: [
			'w-full rounded-bench border-2 border-line-strong bg-surface-raised text-fg',
			'placeholder:text-fg-muted disabled:cursor-not-allowed disabled:opacity-55',
			'aria-invalid:border-fail'
		],
		hint: 'text-fg-muted',
		error: 'flex items-center gap-1.5 font-bold text-fail-fg'
	},
	variants: {
		size: {
			md: {
				label: 'text-base',
				control: 'min-h-11 px-3 text-base',
				hint: 'text-base',
				error: 'text-base'
			},
			bench: {
				label: 'text-bench-base',
				control: 'min-h-target px-4 text-bench-base',
				hint: 'text-bench-sm',
				error: 'text-bench-sm'
			}
		}
	},
	defaultVariants: { size: 'bench' }
});
