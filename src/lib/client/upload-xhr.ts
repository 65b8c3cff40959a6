/** Sends a file as the request body with upload progress (fetch cannot report it), answering like fetch-json. */
import { ApiClientError } from '~/lib/client/fetch-json.ts';

export function uploadFile<T>(url: string, file: Blob, onProgress: (fraction: number) => void): Promise<T> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.setRequestHeader('content-type', 'text/csv');
    xhr.setRequestHeader('accept', 'application/json');
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.upload.onload = () => onProgress(1);
    xhr.onerror = () =>
      reject(
        new ApiClientError(0, 'network', 'The upload did not reach the server; check the connection and try again.'),
      );
    xhr.onload = () => {
      let body: { error?: { code: string; message: string; fields?: Record<string, string> } } | null = null;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        /* not JSON */
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve(body as T);
      else
        reject(
          new ApiClientError(
            xhr.status,
            body?.error?.code ?? 'http_error',
            body?.error?.message ?? `Upload failed (${xhr.status})`,
            body?.error?.fields ?? {},
          ),
        );
    };
    xhr.send(file);
  });
}
