import decode from "heic-decode";

/**
 * Phone HEIC (HEVC) is decoded by libheif in WASM: ~2 s and ~480 MB peak for 12 MP
 * (heic-decode 2.1.0, figures noted when it was chosen), and mostly synchronous. One at a time, so a shoot of thirty
 * iPhone pictures does not take the machine's memory all at once.
 */
let tail: Promise<unknown> = Promise.resolve();

export function decodeHeicOneAtATime(buf: Buffer) {
  const job = tail.then(() => decode({ buffer: buf }));
  tail = job.catch(() => undefined);
  return job;
}
