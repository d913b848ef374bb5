// Browser side of an upload: XMLHttpRequest, because fetch cannot report upload progress.
export interface UploadProgress {
	sent: number;
	total: number;
}

export interface UploadAnswer {
	status: number;
	body: Record<string, unknown> & { message?: string };
}

export function uploadCsv(url: string, file: Blob, onProgress: (p: UploadProgress) => void, signal?: AbortSignal): Promise<UploadAnswer> {
	return new Promise((resolve, reject) => {
		const xhr = new XMLHttpRequest();
		xhr.open('POST', url);
		xhr.setRequestHeader('content-type', 'text/csv');
		xhr.setRequestHeader('accept', 'application/json');
		xhr.upload.onprogress = (e) => onProgress({ sent: e.loaded, total: e.lengthComputable ? e.total : file.size });
		xhr.onload = () => {
			let body: UploadAnswer['body'] = {};
			try {
				body = JSON.parse(xhr.responseText);
			} catch {
				body = { message: `The server answered ${xhr.status} without details.` };
			}
			resolve({ status: xhr.status, body });
		};
		xhr.onerror = () => reject(new Error('The connection was lost during the upload. Nothing was imported; try again.'));
		xhr.onabort = () => reject(new Error('Upload cancelled. Nothing was imported.'));
		signal?.addEventListener('abort', () => xhr.abort());
		xhr.send(file);
	});
}

export function newClientRef(): string {
	return crypto.randomUUID().replace(/-/g, '');
}
