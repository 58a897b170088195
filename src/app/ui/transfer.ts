import { HttpClient, HttpEventType, type HttpEvent, type HttpResponse } from '@angular/common/http';
import { Observable, map, type OperatorFunction } from 'rxjs';

/** Where a download or an upload stands, in words for the progress note (`ui/progress-note.ts`). */
export interface Transfer<T> {
  text: string;
  /** 0–100, or null while the length of the wait is unknown (the server preparing or reading). */
  percent: number | null;
  /** The answer, on the last value only. */
  result?: T;
}

export interface TransferWords {
  /** While the request body goes up: "Sending workbook" (followed by ": 40 %"). */
  sending?: string;
  /** Once it is up and the server works on it: "Reading workbook…", "Preparing the workbook…". */
  waiting: string;
}

const size = (bytes: number) => (bytes < 1024 * 1024 ? `${Math.max(1, Math.round(bytes / 1024))} kB` : `${(bytes / 1024 / 1024).toFixed(1)} MB`);

/**
 * HttpClient's events (`observe: 'events', reportProgress: true`) as words and a percentage: sending
 * (with its percentage), the server's work (no percentage: it says none), receiving (a percentage
 * when the length is known), done with the answer.
 */
export function transferProgress<T, R = T>(words: TransferWords, done: (response: HttpResponse<T>) => R): OperatorFunction<HttpEvent<T>, Transfer<R>> {
  return map((event): Transfer<R> => {
    switch (event.type) {
      case HttpEventType.UploadProgress: {
        if (!words.sending || !event.total || event.loaded >= event.total) return { text: words.waiting, percent: null };
        const percent = Math.floor((event.loaded / event.total) * 100);
        return { text: `${words.sending}: ${percent} %`, percent };
      }
      case HttpEventType.DownloadProgress:
        return event.total
          ? { text: `Downloading: ${Math.floor((event.loaded / event.total) * 100)} % of ${size(event.total)}`, percent: Math.floor((event.loaded / event.total) * 100) }
          : { text: `Downloading: ${size(event.loaded)}`, percent: null };
      case HttpEventType.Response:
        return { text: 'Done.', percent: 100, result: done(event) };
      default:
        return { text: words.waiting, percent: null };
    }
  });
}

/** The file name a Content-Disposition header gives (RFC 6266: `filename*` first), else `fallback`. */
export function attachmentName(disposition: string | null, fallback: string): string {
  if (!disposition) return fallback;
  const extended = /filename\*\s*=\s*UTF-8''([^;]+)/i.exec(disposition);
  if (extended) {
    try {
      return decodeURIComponent(extended[1].trim());
    } catch {
      // A malformed encoding: the plain name below, else the fallback.
    }
  }
  const plain = /filename\s*=\s*"([^"]*)"|filename\s*=\s*([^;]+)/i.exec(disposition);
  return (plain?.[1] ?? plain?.[2]?.trim()) || fallback;
}

/** Hands a received file to the browser's downloads, under the server's file name. */
export function saveFile(blob: Blob, filename: string): void {
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = filename;
  link.style.display = 'none';
  document.body.append(link);
  link.click();
  link.remove();
  // Revoked on the next turn: the click has started the download by then.
  setTimeout(() => URL.revokeObjectURL(url));
}

/**
 * THE way the client downloads an export (workbooks, report, OCDS, CSV): fetched with progress,
 * then saved under the server's file name (`sendDownload` on the server sets it). `preparing`
 * says what the server is doing meanwhile ("Preparing the workbook…").
 */
export function downloadFile(http: HttpClient, url: string, preparing: string): Observable<Transfer<string>> {
  return http.get(url, { observe: 'events', reportProgress: true, responseType: 'blob' }).pipe(
    transferProgress<Blob, string>({ waiting: preparing }, (response) => {
      const name = attachmentName(response.headers.get('Content-Disposition'), url.split('/').pop() ?? 'download');
      if (response.body) saveFile(response.body, name);
      return name;
    }),
  );
}
