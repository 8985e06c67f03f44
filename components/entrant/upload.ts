/**
 * Multipart upload with progress in the browser (XMLHttpRequest's upload.onprogress: fetch has no
 * upload progress). Resolves with the status and parsed JSON body.
 */
export interface UploadReply<T = Record<string, unknown>> {
  status: number;
  body: T & { error?: string; fields?: Record<string, string> };
}

export function uploadWithProgress<T>(url: string, form: FormData, onProgress: (fraction: number) => void): Promise<UploadReply<T>> {
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.responseType = 'json';
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.onload = () => resolve({ status: xhr.status, body: (xhr.response ?? { error: 'The server sent no answer.' }) as UploadReply<T>['body'] });
    xhr.onerror = () => resolve({ status: 0, body: { error: 'The upload was interrupted; nothing was saved. Check your connection and try again.' } as UploadReply<T>['body'] });
    xhr.send(form);
  });
}

export async function postJson<T>(url: string, json: unknown, method = 'POST'): Promise<UploadReply<T>> {
  try {
    const res = await fetch(url, { method, headers: { 'content-type': 'application/json' }, body: JSON.stringify(json ?? {}) });
    return { status: res.status, body: await res.json().catch(() => ({ error: 'The server sent no answer.' })) };
  } catch {
    return { status: 0, body: { error: 'The request did not reach the server; try again.' } as UploadReply<T>['body'] };
  }
}
