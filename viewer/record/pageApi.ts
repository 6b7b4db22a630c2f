// The recorder as the page offers it to scripts (`axonloom record` drives it in headless
// Chromium through playwright): window.__axonloomRecorder. Plain JSON in and out, so a caller
// outside the page needs nothing of ours; a video's bytes leave through a write function the
// caller provides (base64 text at byte offsets), and failures come back as one line, not thrown.
import { recordStill, recordVideo, RecordError, type ByteSink, type RecordErrorCode, type RecordStats, type RecordSubject } from './recorder.ts';
import type { StillOptions, VideoOptions } from './recordOptions.ts';

export type PageOutcome<T> = { ok: true; value: T } | { ok: false; code: RecordErrorCode; message: string };

export interface RecorderPageApi {
  /** bump when the calls below change */
  version: 1;
  /** Records a video. `write` receives (byte offset, base64 bytes) and may return a promise
   *  (waited for: backpressure); `progress` (frames done, frames in all). */
  record(opts: VideoOptions, write: (position: number, base64: string) => unknown, progress?: (done: number, total: number) => unknown): Promise<PageOutcome<RecordStats>>;
  /** Draws one still; the PNG comes back as base64. */
  still(opts: StillOptions): Promise<PageOutcome<{ png: string; bytes: number }>>;
  /** Stops the recording in progress (it then resolves with code "cancelled"). */
  cancel(): void;
}

declare global {
  interface Window {
    __axonloomRecorder?: RecorderPageApi;
  }
}

/** Offers the recorder on window for the runs `subject()` returns when called; returns a
 *  function that takes it away again. */
export function installRecorderApi(subject: () => RecordSubject): () => void {
  let abort: AbortController | null = null;
  const api: RecorderPageApi = {
    version: 1,
    async record(opts, write, progress) {
      abort = new AbortController();
      const sink: ByteSink = { write: async (position, data) => void (await write(position, await toBase64(data))) };
      return outcome(async () => (await recordVideo(subject(), opts, sink, { signal: abort!.signal, onProgress: (d, n) => void progress?.(d, n) })).stats);
    },
    async still(opts) {
      return outcome(async () => {
        const png = await recordStill(subject(), opts);
        return { png: await toBase64(new Uint8Array(await png.arrayBuffer())), bytes: png.size };
      });
    },
    cancel() {
      abort?.abort();
    },
  };
  window.__axonloomRecorder = api;
  return () => {
    if (window.__axonloomRecorder === api) delete window.__axonloomRecorder;
  };
}

// --- private helpers ---

async function outcome<T>(f: () => Promise<T>): Promise<PageOutcome<T>> {
  try {
    return { ok: true, value: await f() };
  } catch (e) {
    if (e instanceof RecordError) return { ok: false, code: e.code, message: e.message };
    return { ok: false, code: 'failed', message: `recording failed: ${(e as Error)?.message ?? String(e)}` };
  }
}

/** Bytes as base64, through the browser's own encoder (a data: URL), fast for megabytes. */
function toBase64(data: Uint8Array): Promise<string> {
  return new Promise((resolve, reject) => {
    const r = new FileReader();
    r.onload = () => resolve(String(r.result).slice(String(r.result).indexOf(',') + 1));
    r.onerror = () => reject(r.error);
    r.readAsDataURL(new Blob([data as Uint8Array<ArrayBuffer>]));
  });
}
