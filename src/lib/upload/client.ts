// Browser side of uploads: announce the file, send it in chunks with XMLHttpRequest (for upload
// progress events), and talk to the upload API. The server refuses request bodies over 1 MiB, so even
// a 200 MiB log travels as 512 KiB chunks; a chunk that fails is sent again from the server's offset.

export class ApiFailure extends Error {
	constructor(
		readonly status: number,
		readonly code: string,
		message: string,
		readonly details?: unknown
	) {
		super(message);
	}
}

async function failure(res: Response): Promise<ApiFailure> {
	try {
		const body = (await res.json()) as { error?: { code: string; message: string; details?: unknown } };
		if (body.error) return new ApiFailure(res.status, body.error.code, body.error.message, body.error.details);
	} catch {
		/* not JSON */
	}
	return new ApiFailure(res.status, 'http_error', `The server answered ${res.status}.`);
}

export async function api<T>(method: 'GET' | 'POST' | 'DELETE', url: string, body?: unknown): Promise<T> {
	const res = await fetch(url, { method, headers: body === undefined ? {} : { 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) });
	if (!res.ok) throw await failure(res);
	return (res.status === 204 ? undefined : await res.json()) as T;
}

function sendChunk(url: string, offset: number, blob: Blob, onProgress: (loaded: number) => void): Promise<{ status: number; body: string }> {
	return new Promise((resolve, reject) => {
		const xhr = new XMLHttpRequest();
		xhr.open('POST', url);
		xhr.setRequestHeader('content-type', 'application/octet-stream');
		xhr.setRequestHeader('x-upload-offset', String(offset));
		xhr.upload.onprogress = (e) => onProgress(e.loaded);
		xhr.onload = () => resolve({ status: xhr.status, body: xhr.responseText });
		xhr.onerror = () => reject(new ApiFailure(0, 'network', 'The connection to the server broke.'));
		xhr.send(blob);
	});
}

export type Purpose = 'run-log' | 'document';

/** Sends `file` to the server; returns the upload id once every byte has arrived. */
export async function sendFile(file: File, purpose: Purpose, onProgress: (sentBytes: number, totalBytes: number) => void): Promise<string> {
	const created = await api<{ id: string; chunkBytes: number }>('POST', '/api/v1/uploads', { purpose, filename: file.name, sizeBytes: file.size });
	const url = `/api/v1/uploads/${created.id}/chunk`;
	let offset = 0;
	let failures = 0;
	while (offset < file.size) {
		const end = Math.min(offset + created.chunkBytes, file.size);
		let answer: { status: number; body: string };
		try {
			answer = await sendChunk(url, offset, file.slice(offset, end), (loaded) => onProgress(offset + loaded, file.size));
		} catch (e) {
			if (++failures > 3) throw e;
			await new Promise((r) => setTimeout(r, 500 * failures));
			continue;
		}
		const parsed = (() => {
			try {
				return JSON.parse(answer.body) as { receivedBytes?: number; error?: { code: string; message: string; details?: { receivedBytes?: number } } };
			} catch {
				return {};
			}
		})();
		if (answer.status === 200 && typeof parsed.receivedBytes === 'number') {
			offset = parsed.receivedBytes;
			failures = 0;
			onProgress(offset, file.size);
		} else if (answer.status === 409 && parsed.error?.code === 'bad_offset' && typeof parsed.error.details?.receivedBytes === 'number') {
			offset = parsed.error.details.receivedBytes; // resume where the server is
		} else if (answer.status >= 500 && ++failures <= 3) {
			await new Promise((r) => setTimeout(r, 500 * failures));
		} else {
			throw new ApiFailure(answer.status, parsed.error?.code ?? 'http_error', parsed.error?.message ?? `The server answered ${answer.status}.`, parsed.error?.details);
		}
	}
	return created.id;
}
