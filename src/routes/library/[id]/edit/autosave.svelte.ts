import { MAX_DOCUMENT_BYTES, utf8Length } from '$lib/procedure';
import { forget, remember } from '$lib/client/draft-recovery';

export type SaveState = 'saved' | 'unsaved' | 'saving' | 'failed';

/**
 * Debounced autosave of the editor's text to POST /api/procedures/[id]/draft. Every change is also kept in the
 * browser first (draft-recovery), so a closed tab or a refused save loses nothing.
 */
export class Autosave {
	state = $state<SaveState>('saved');
	message = $state('');
	#saved: string;
	#base: string | null;
	#timer: ReturnType<typeof setTimeout> | undefined;
	#latest: string;

	constructor(
		private readonly procedureId: string,
		source: string,
		base: string | null,
		private readonly delayMs = 1200
	) {
		this.#saved = source;
		this.#latest = source;
		this.#base = base;
	}

	changed(source: string): void {
		this.#latest = source;
		if (source === this.#saved) {
			this.state = 'saved';
			forget(this.procedureId);
			return;
		}
		remember(this.procedureId, source, this.#base);
		this.state = 'unsaved';
		clearTimeout(this.#timer);
		this.#timer = setTimeout(() => void this.flush(), this.delayMs);
	}

	/** Saves now if anything is unsaved; resolves true when the server has the current text. */
	async flush(): Promise<boolean> {
		clearTimeout(this.#timer);
		const source = this.#latest;
		if (source === this.#saved) return true;
		const bytes = utf8Length(source);
		if (bytes > MAX_DOCUMENT_BYTES) {
			this.state = 'failed';
			this.message = `Not saved: this document is ${bytes.toLocaleString('en')} bytes (UTF-8); the limit is ${MAX_DOCUMENT_BYTES.toLocaleString('en')}. Your text is kept in this browser.`;
			return false;
		}
		this.state = 'saving';
		try {
			const res = await fetch(`/api/procedures/${this.procedureId}/draft`, {
				method: 'POST',
				headers: { 'content-type': 'application/json' },
				body: JSON.stringify({ source, ...(this.#base ? { baseUpdatedAt: this.#base } : {}) })
			});
			const body = await res.json().catch(() => ({}));
			if (!res.ok) {
				this.state = 'failed';
				this.message = `Not saved: ${body.message ?? `the server answered ${res.status}`} Your text is kept in this browser.`;
				return false;
			}
			this.#saved = source;
			this.#base = body.updatedAt;
			this.message = '';
			if (this.#latest === source) {
				this.state = 'saved';
				forget(this.procedureId);
				return true;
			}
			this.changed(this.#latest);
			return false;
		} catch {
			this.state = 'failed';
			this.message =
				'Not saved: no connection to the server. Your text is kept in this browser; saving resumes on the next change.';
			return false;
		}
	}
}
