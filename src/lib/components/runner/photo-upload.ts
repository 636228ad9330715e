/** The runner's photo upload: one picture to `POST /api/images` as a run photo, answered in words on refusal. */
export interface UploadedPhoto {
	id: string;
	url: string;
}

export async function uploadRunPhoto(
	file: File
): Promise<{ ok: true; photo: UploadedPhoto } | { ok: false; message: string }> {
	const form = new FormData();
	form.set('purpose', 'finding');
	form.set('file', file);
	try {
		const res = await fetch('/api/images', { method: 'POST', body: form });
		const body = (await res.json().catch(() => null)) as { id?: string; url?: string; message?: string } | null;
		if (res.status === 201 && body?.id && body.url) return { ok: true, photo: { id: body.id, url: body.url } };
		return { ok: false, message: body?.message ?? `The photo was not stored (the server answered ${res.status}).` };
	} catch {
		return { ok: false, message: 'The server could not be reached; the photo was not stored. Try again.' };
	}
}
