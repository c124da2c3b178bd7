import { z } from "zod";
import { MAX_PASSWORD_CHARS } from "~/domain/passwords";

/** An e-mail address as typed: trimmed, lower-cased, at most 254 characters (RFC 5321 path limit). */
export const email = z.string().trim().toLowerCase().max(254, "That address is too long.").pipe(z.email("Enter an e-mail address like name@example.org."));
// The length rule itself lives in the domain policy (code points); here only a hard cap against abuse.
export const password = z.string().max(MAX_PASSWORD_CHARS * 4, "Use at most 128 characters.");
export const displayName = z
  .string()
  .trim()
  .min(1, "Tell us what to call you.")
  .max(60, "Use at most 60 characters.")
  // eslint-disable-next-line no-control-regex
  .refine((s) => !/[\u0000-\u001f\u007f<>]/.test(s), "Use letters, numbers and ordinary punctuation.");

export const joinForm = z.object({ email, password, displayName });
export const loginForm = z.object({ email, password: z.string().max(1024) });
export const forgotForm = z.object({ email });
export const resetForm = z.object({ token: z.string().min(10).max(200), password });
export const changePasswordForm = z.object({ current: z.string().max(1024), password, signOutOthers: z.string().optional() });

// The form helpers live in ./forms (one mapper for every page); re-exported for the account pages that import them here.
export { fieldErrors, formFields } from "./forms";

const slugRule = z
  .string()
  .trim()
  .toLowerCase()
  .max(60)
  .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "Use lowercase letters, digits and dashes.");
export const makeForm = z.object({
  slug: slugRule,
  name: z.string().trim().min(2, "Give the make's name.").max(80),
  colourSystem: z.enum(["jis", "din", "bs", "en", "iec"], { error: "Choose how this make writes colours." }),
  blurb: z.string().trim().max(400).default(""),
});
export const familyForm = z
  .object({
    slug: slugRule,
    name: z.string().trim().min(2, "Give the family's name.").max(80),
    modelRange: z.string().trim().max(120),
    yearFrom: z.coerce.number().int().min(1900).max(2100),
    yearTo: z.coerce.number().int().min(1900).max(2100),
  })
  .refine((f) => f.yearTo >= f.yearFrom, { message: "The last year comes after the first.", path: ["yearTo"] });
