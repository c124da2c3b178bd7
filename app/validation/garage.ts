/** The rider's forms: a card's save / bike check / mistake report, and the garage's add-a-bike and remove. */
import { z } from "zod";

/** A model year as typed: empty is "not given"; anything else a whole number (the family's own range is the service's). */
const modelYear = (message: string, range = false) =>
  z
    .string()
    .trim()
    .default("")
    .transform((v) => (v === "" ? null : Number(v)))
    .refine((v) => v === null || (Number.isInteger(v) && (!range || (v >= 1900 && v <= 2100))), message);

const REPORT_WORDS = "Say what is wrong in a sentence or two (at most 2000 characters).";

export const cardActionForm = z.discriminatedUnion(
  "intent",
  [
    z.object({ intent: z.literal("save") }),
    z.object({ intent: z.literal("check"), year: modelYear("Enter your bike's model year, like 1979.", true) }),
    z.object({ intent: z.literal("report"), text: z.string({ error: REPORT_WORDS }).trim().min(5, REPORT_WORDS).max(2000, REPORT_WORDS) }),
  ],
  { error: "Unknown request." },
);

export const garageForm = z.discriminatedUnion(
  "intent",
  [
    z.object({ intent: z.literal("remove"), id: z.coerce.number().int().positive() }),
    z.object({
      intent: z.literal("bike"),
      family: z.string().trim().default(""),
      year: modelYear("Enter a year like 1979."),
      label: z.string().trim().default(""),
    }),
  ],
  { error: "Unknown request." },
);
