"use client";
import { useCallback, useRef, useState } from "react";
import { CLIP_LIMITS, clipsUrl, type ClipTargetKind } from "@/lib/validation/level-match";

// Uploads one WAV clip with XMLHttpRequest, so the page can show upload
// progress (fetch cannot report it). Refuses obviously wrong files before
// sending: not .wav, empty, over the size limit.

export type UploadState =
  | { phase: "idle" }
  | { phase: "uploading"; fileName: string; loaded: number; total: number }
  | { phase: "measuring"; fileName: string }
  | { phase: "done"; fileName: string }
  | { phase: "error"; fileName: string | null; message: string };

function megabytes(n: number) {
  return `${(n / (1024 * 1024)).toFixed(1).replace(/\.0$/, "")} MB`;
}

export function checkClipFile(file: File): string | null {
  if (!/\.wav$/i.test(file.name) && !/^audio\/(x-)?wav|^audio\/wave/.test(file.type)) {
    return `${file.name} is not a WAV file. Export the clip as WAV (PCM 16/24/32-bit or 32-bit float).`;
  }
  if (file.size === 0) return `${file.name} is empty.`;
  if (file.size > CLIP_LIMITS.maxBytes) return `${file.name} is ${megabytes(file.size)}; the limit is ${megabytes(CLIP_LIMITS.maxBytes)} (about ${CLIP_LIMITS.maxSeconds / 60} minutes is plenty for a clip).`;
  return null;
}

export function useClipUpload(zoneId: string, onUploaded: () => void) {
  const [state, setState] = useState<UploadState>({ phase: "idle" });
  const xhrRef = useRef<XMLHttpRequest | null>(null);

  const upload = useCallback(
    (file: File, target: { kind: ClipTargetKind; id: string }) => {
      const problem = checkClipFile(file);
      if (problem) {
        setState({ phase: "error", fileName: file.name, message: problem });
        return;
      }
      const form = new FormData();
      form.set(target.kind === "source" ? "sourceId" : "presetId", target.id);
      form.set("file", file);
      const xhr = new XMLHttpRequest();
      xhrRef.current = xhr;
      xhr.open("POST", clipsUrl(zoneId));
      xhr.setRequestHeader("accept", "application/json");
      xhr.upload.onprogress = (e) => {
        if (e.lengthComputable) setState({ phase: "uploading", fileName: file.name, loaded: e.loaded, total: e.total });
      };
      xhr.upload.onload = () => setState({ phase: "measuring", fileName: file.name });
      xhr.onload = () => {
        xhrRef.current = null;
        if (xhr.status >= 200 && xhr.status < 300) {
          setState({ phase: "done", fileName: file.name });
          onUploaded();
          return;
        }
        let message = `The upload failed (${xhr.status}).`;
        try {
          const body = JSON.parse(xhr.responseText) as { error?: { message?: string } };
          if (body.error?.message) message = body.error.message;
        } catch {
          /* not JSON */
        }
        setState({ phase: "error", fileName: file.name, message });
      };
      xhr.onerror = () => {
        xhrRef.current = null;
        setState({ phase: "error", fileName: file.name, message: "The upload was interrupted. Check the connection and try again; nothing was stored." });
      };
      xhr.onabort = () => {
        xhrRef.current = null;
        setState({ phase: "idle" });
      };
      setState({ phase: "uploading", fileName: file.name, loaded: 0, total: file.size });
      xhr.send(form);
    },
    [zoneId, onUploaded],
  );

  const cancel = useCallback(() => xhrRef.current?.abort(), []);
  const reset = useCallback(() => setState({ phase: "idle" }), []);
  return { state, upload, cancel, reset };
}
