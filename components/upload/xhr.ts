/**
 * Sends a multipart form with XMLHttpRequest so the page can show real upload progress (fetch reports no
 * upload progress). Resolves with the status and the parsed JSON body; rejects only when the request
 * could not be made (network down) or was aborted.
 */
export interface XhrUpload {
  promise: Promise<{ status: number; body: unknown }>;
  abort: () => void;
}

/** Bytes sent and the total, as the browser reports them; `total` is 0 when not known. */
export type UploadProgress = { loaded: number; total: number };

export function xhrUpload(url: string, form: FormData, onProgress: (p: UploadProgress) => void): XhrUpload {
  const xhr = new XMLHttpRequest();
  const promise = new Promise<{ status: number; body: unknown }>((resolve, reject) => {
    xhr.open('POST', url);
    xhr.responseType = 'text';
    xhr.setRequestHeader('accept', 'application/json');
    xhr.withCredentials = true;
    xhr.upload.onprogress = (e) => onProgress({ loaded: e.loaded, total: e.lengthComputable ? e.total : 0 });
    xhr.upload.onload = () => onProgress({ loaded: 1, total: 1 });
    xhr.onload = () => {
      let body: unknown = null;
      try {
        body = xhr.responseText ? JSON.parse(xhr.responseText) : null;
      } catch {
        body = null;
      }
      resolve({ status: xhr.status, body });
    };
    xhr.onerror = () => reject(new Error('The upload did not reach the server. Check the connection and try again.'));
    xhr.onabort = () => reject(new DOMException('The upload was stopped.', 'AbortError'));
    xhr.send(form);
  });
  return { promise, abort: () => xhr.abort() };
}
