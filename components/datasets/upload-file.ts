// A browser upload with progress. fetch() reports no upload progress, so this one request goes through
// XMLHttpRequest: the file is the raw body (streamed by the browser from disk, never read into memory here)
// with its media type and ?filename=, as the route wants it.
import { ApiProblem } from "@/components/data/api";
import type { DatasetBody } from "@/components/jobs/bodies";

export interface UploadProgress {
  sent: number;
  total: number;
}

export function uploadDataset(
  file: File,
  mediaType: string,
  epsg: number | undefined,
  onProgress: (p: UploadProgress) => void,
  signal?: AbortSignal,
): Promise<{ dataset: DatasetBody; created: boolean }> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    const query = new URLSearchParams({ filename: file.name, ...(epsg === undefined ? {} : { epsg: String(epsg) }) });
    xhr.open("POST", `/api/v1/datasets?${query}`);
    xhr.setRequestHeader("content-type", mediaType);
    xhr.setRequestHeader("accept", "application/json");
    xhr.withCredentials = true;
    xhr.upload.onprogress = (e) => onProgress({ sent: e.loaded, total: e.lengthComputable ? e.total : file.size });
    xhr.onload = () => {
      let body: Record<string, unknown> = {};
      try {
        body = JSON.parse(xhr.responseText) as Record<string, unknown>;
      } catch {
        body = { detail: xhr.responseText.slice(0, 200) };
      }
      if (xhr.status >= 200 && xhr.status < 300) {
        resolve({ dataset: body as unknown as DatasetBody, created: xhr.status === 201 });
      } else {
        reject(new ApiProblem(xhr.status, body, xhr.getResponseHeader("retry-after")));
      }
    };
    xhr.onerror = () => reject(new Error("The upload was interrupted (network error)."));
    xhr.onabort = () => reject(new Error("The upload was cancelled."));
    signal?.addEventListener("abort", () => xhr.abort(), { once: true });
    xhr.send(file);
  });
}
