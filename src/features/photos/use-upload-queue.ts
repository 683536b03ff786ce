import { useCallback, useEffect, useLayoutEffect, useReducer, useRef } from "react";
import { kindFromFileName } from "../../domain/photo-matching";
import type { Photo } from "../../schemas/photos";
import { UploadError, uploadOne, type UploadTags } from "./api";

export type UploadState = "queued" | "uploading" | "processing" | "done" | "failed";
export interface UploadItem {
  key: string;
  file: File;
  tags: UploadTags;
  state: UploadState;
  progress: number;
  error?: string;
  /** False when the server refused the file itself: sending it again cannot help. */
  retryable?: boolean;
  photo?: Photo;
}

/** A few at a time: enough to fill a phone's uplink, not so many that each crawls. */
export const PARALLEL_UPLOADS = 3;

type Action =
  | { type: "add"; items: UploadItem[] }
  | { type: "patch"; key: string; patch: Partial<UploadItem> }
  | { type: "retry"; key: string }
  | { type: "clearDone" };

function reducer(items: UploadItem[], a: Action): UploadItem[] {
  switch (a.type) {
    case "add":
      return [...items, ...a.items];
    case "patch":
      return items.map((i) => (i.key === a.key ? { ...i, ...a.patch } : i));
    case "retry":
      return items.map((i) => (i.key === a.key ? { ...i, state: "queued", progress: 0, error: undefined } : i));
    case "clearDone":
      return items.filter((i) => i.state !== "done");
  }
}

let counter = 0;

export function useUploadQueue(siteId: string, onDone?: (p: Photo) => void) {
  const [items, dispatch] = useReducer(reducer, []);
  const started = useRef(new Set<string>());
  const onDoneRef = useRef(onDone);
  useLayoutEffect(() => {
    onDoneRef.current = onDone; // the latest callback, without restarting uploads when it changes
  });

  const start = useCallback(
    (item: UploadItem) => {
      dispatch({ type: "patch", key: item.key, patch: { state: "uploading", progress: 0 } });
      uploadOne(siteId, item.file, item.tags, (f) =>
        dispatch({
          type: "patch",
          key: item.key,
          patch: f >= 1 ? { state: "processing", progress: 1 } : { progress: f },
        }),
      )
        .then((photo) => {
          dispatch({ type: "patch", key: item.key, patch: { state: "done", progress: 1, photo } });
          onDoneRef.current?.(photo);
        })
        .catch((e: Error) =>
          dispatch({
            type: "patch",
            key: item.key,
            patch: { state: "failed", error: e.message, retryable: !(e instanceof UploadError) || e.retryable },
          }),
        )
        .finally(() => started.current.delete(item.key));
    },
    [siteId],
  );

  useEffect(() => {
    const active = items.filter((i) => i.state === "uploading" || i.state === "processing").length;
    const next = items
      .filter((i) => i.state === "queued" && !started.current.has(i.key))
      .slice(0, Math.max(0, PARALLEL_UPLOADS - active));
    for (const i of next) {
      started.current.add(i.key);
      start(i);
    }
  }, [items, start]);

  const inFlight = items.some((i) => i.state === "queued" || i.state === "uploading" || i.state === "processing");
  useEffect(() => {
    if (!inFlight) return;
    // Leaving mid-upload loses the rest of the shoot: the browser asks first.
    const warn = (e: BeforeUnloadEvent) => {
      e.preventDefault();
      e.returnValue = "";
    };
    window.addEventListener("beforeunload", warn);
    return () => window.removeEventListener("beforeunload", warn);
  }, [inFlight]);

  return {
    items,
    inFlight,
    add: (files: File[], tags: UploadTags) =>
      dispatch({
        type: "add",
        // A file whose name says its kind ("…_nameplate.jpg") is uploaded as that kind.
        items: files.map((file) => ({
          key: `u${++counter}`,
          file,
          tags: { ...tags, kind: kindFromFileName(file.name) ?? tags.kind },
          state: "queued" as const,
          progress: 0,
        })),
      }),
    retry: (key: string) => dispatch({ type: "retry", key }),
    clearDone: () => dispatch({ type: "clearDone" }),
  };
}
