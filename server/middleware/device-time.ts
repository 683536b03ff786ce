import type { Request } from "express";
import { z } from "zod";
import { DEVICE_TIME_HEADER } from "../../src/domain/device-clock";
import { AppError } from "../errors";

/**
 * What the phone's clock read as it sent this request (the outbox's `Tideline-Device-Time` header,
 * ISO 8601), so the server can put a time the phone gave on its own clock; null when absent. A header
 * that is there but unreadable is bad input, never ignored.
 */
export function deviceTimeOf(req: Request): Date | null {
  const v = req.get(DEVICE_TIME_HEADER);
  if (v === undefined) return null;
  const parsed = z.iso.datetime({ offset: true }).safeParse(v.trim());
  if (!parsed.success)
    throw new AppError(400, "invalid_input", `The ${DEVICE_TIME_HEADER} header is not an ISO 8601 date and time.`);
  return new Date(parsed.data);
}
