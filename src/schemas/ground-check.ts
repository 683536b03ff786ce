/**
 * The ground-lamp check's answer and what it is built from (every reading's common fields, the verdict and the
 * source a judgement names), apart from the other readings' schemas: the board page reads its latest check as it
 * opens, and builds only these (zod builds a schema when its module is evaluated). src/schemas/readings.ts uses
 * and re-exports them.
 */
import { z } from "zod";
import { text as safeText } from "./common";
import { VERDICTS } from "../domain/reading-judgement";

export const LAMP_LOOKS = ["bright", "dim", "dark"] as const;
export const PHASE_KEYS = ["A", "B", "C"] as const;

export const phases = <T extends z.ZodType>(s: T) => z.object({ A: s, B: s, C: s });
export const sourceSchema = z.object({ table: safeText(), text: safeText() });
export type CriterionSourceDto = z.infer<typeof sourceSchema>;
export const verdict = z.enum(VERDICTS);
/** What every reading's answer carries. */
export const readingBase = {
  id: safeText(),
  boardId: safeText(),
  componentId: safeText().nullable(),
  designation: safeText().nullable(),
  measuredAt: safeText(),
  instrument: safeText(),
  notes: safeText(),
  recordedBy: safeText().nullable(),
};

export const groundCheckSchema = z.object({
  ...readingBase,
  energisation: safeText(),
  lineVolts: z.number(),
  lamps: phases(z.enum(LAMP_LOOKS)).nullable(),
  volts: phases(z.number()).nullable(),
  branchOhms: z.number().nullable(),
  capacitanceMicroF: z.number().nullable(),
  judgement: z.object({
    phase: z.enum(PHASE_KEYS).nullable(),
    faultOhms: z.number().nullable(),
    faultRange: z
      .object({
        lowOhms: z.number().nullable(),
        centralOhms: z.number().nullable(),
        highOhms: z.number().nullable(),
        capacitanceNeglected: z.boolean(),
      })
      .nullable(),
    words: safeText(),
    verdict,
    source: sourceSchema,
  }),
});
export type GroundCheck = z.infer<typeof groundCheckSchema>;
