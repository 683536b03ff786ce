import { useEffect, useRef, useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { tagFromScan } from "../../../domain/label-sheets";
import { fieldError, useSchemaForm } from "../../../lib/form";
import { tagParams } from "../../../schemas/reports";

/** What was typed → the tag number (a label's link is read like a scan); tagParams (the server's own schema) checks it. */
const typedTag = z
  .object({ tag: z.string() })
  .transform(({ tag }, ctx) => {
    const read = tagFromScan(tag);
    if (read) return { tag: read };
    ctx.addIssue({ code: "custom", path: ["tag"], message: "Type the tag number as printed, e.g. KL-0401." });
    return z.NEVER;
  })
  .pipe(tagParams);

type DetectorLike = { detect(source: CanvasImageSource): Promise<Array<{ rawValue: string }>> };
type DetectorCtor = { new (o: { formats: string[] }): DetectorLike; getSupportedFormats?: () => Promise<string[]> };

/** The browser's own QR reader where it has one (BarcodeDetector), else jsqr over camera frames. */
async function makeReader(): Promise<(video: HTMLVideoElement, canvas: HTMLCanvasElement) => Promise<string | null>> {
  const BD = (globalThis as unknown as { BarcodeDetector?: DetectorCtor }).BarcodeDetector;
  const formats: string[] = BD?.getSupportedFormats ? await BD.getSupportedFormats().catch(() => [] as string[]) : [];
  if (BD && formats.includes("qr_code")) {
    const detector = new BD({ formats: ["qr_code"] });
    return async (video) => (await detector.detect(video))[0]?.rawValue ?? null;
  }
  const { default: jsQR } = await import("jsqr");
  return async (video, canvas) => {
    const w = video.videoWidth,
      h = video.videoHeight;
    if (!w || !h) return null;
    const scale = Math.min(1, 800 / Math.max(w, h));
    canvas.width = Math.round(w * scale);
    canvas.height = Math.round(h * scale);
    const ctx = canvas.getContext("2d", { willReadFrequently: true })!;
    ctx.drawImage(video, 0, 0, canvas.width, canvas.height);
    const img = ctx.getImageData(0, 0, canvas.width, canvas.height);
    return jsQR(img.data, img.width, img.height, { inversionAttempts: "dontInvert" })?.data ?? null;
  };
}

/** Scan a tag with the phone's camera, or type it. Calls onTag with the tag number read. */
export function TagScanner({ onTag }: { onTag: (tag: string) => void }) {
  const video = useRef<HTMLVideoElement>(null);
  const canvas = useRef<HTMLCanvasElement>(null);
  const stream = useRef<MediaStream | null>(null);
  const [state, setState] = useState<"idle" | "starting" | "scanning">("idle");
  const [message, setMessage] = useState("");
  const form = useSchemaForm(typedTag, { tag: "" });

  const stop = () => {
    stream.current?.getTracks().forEach((t) => t.stop());
    stream.current = null;
    setState("idle");
  };
  useEffect(() => stop, []);

  async function start() {
    setMessage("");
    if (!navigator.mediaDevices?.getUserMedia) {
      setMessage("This browser cannot open the camera here. Type the tag number instead.");
      return;
    }
    setState("starting");
    try {
      stream.current = await navigator.mediaDevices.getUserMedia({
        video: { facingMode: "environment" },
        audio: false,
      });
    } catch {
      setState("idle");
      setMessage("The camera could not be opened (permission refused or no camera). Type the tag number instead.");
      return;
    }
    const v = video.current!;
    v.srcObject = stream.current;
    await v.play().catch(() => {});
    setState("scanning");
    const read = await makeReader();
    let unreadable = "";
    const tick = async () => {
      if (!stream.current) return;
      const text = await read(v, canvas.current!).catch(() => null);
      if (text) {
        const tag = tagFromScan(text);
        if (tag) {
          stop();
          onTag(tag);
          return;
        }
        if (text !== unreadable) {
          unreadable = text;
          setMessage("That code is not a Tideline tag. Try the tag's own label.");
        }
      }
      setTimeout(() => void tick(), 150);
    };
    void tick();
  }

  return (
    <div className="space-y-4">
      <div className="relative overflow-hidden rounded-lg bg-hull-950 ring-1 ring-hull-600" hidden={state === "idle"}>
        <video ref={video} className="aspect-[4/3] w-full object-cover" muted playsInline aria-label="Camera view" />
        <div aria-hidden className="pointer-events-none absolute inset-[18%] rounded-md border-4 border-brass-400/80" />
      </div>
      <canvas ref={canvas} hidden />
      <div className="flex flex-wrap gap-3">
        {state === "idle" ? (
          <Button onClick={() => void start()} className="min-h-14 px-6 text-lg">
            Scan a tag
          </Button>
        ) : (
          <Button tone="quiet" onClick={stop}>
            Stop the camera
          </Button>
        )}
      </div>
      <p className="text-sm text-mist" aria-live="polite">
        {state === "scanning"
          ? "Hold the tag's code inside the frame."
          : state === "starting"
            ? "Opening the camera…"
            : ""}
      </p>
      {message && (
        <p className="text-sm text-rust-300" role="alert">
          {message}
        </p>
      )}
      <form
        className="flex flex-wrap items-end gap-3"
        noValidate
        onSubmit={(ev) => void form.handleSubmit(({ tag }) => onTag(tag))(ev)}
      >
        <TextField
          label="Or type the tag number"
          {...form.register("tag")}
          error={fieldError(form.formState.errors, "tag")}
          autoCapitalize="characters"
          autoComplete="off"
          spellCheck={false}
          className="min-w-48 flex-1"
        />
        <Button type="submit" tone="quiet">
          Open
        </Button>
      </form>
    </div>
  );
}
