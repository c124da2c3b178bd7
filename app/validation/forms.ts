/**
 * From a submitted form (or a query string) to a checked value, one way for every page: read the fields once
 * (`formFields`), check them with a zod schema from app/validation/, and map the schema's issues to the form's fields
 * (`fieldErrors`) or, for a one-line answer, to a sentence (`issueSentence`, the same words the JSON API's 400 uses).
 */
export type Issue = { path: PropertyKey[]; message: string };

/** A form's fields as a plain object of strings (files and repeated fields ignored; the first value of a name wins). */
export function formFields(form: FormData | URLSearchParams): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of form) if (typeof v === "string" && !(k in out)) out[k] = v;
  return out;
}

/** zod issues as {field: message}, first message per field ("form" for an issue of the whole form). */
export function fieldErrors(issues: Issue[]): Record<string, string> {
  const out: Record<string, string> = {};
  for (const i of issues) {
    const k = String(i.path[0] ?? "form");
    out[k] ??= i.message;
  }
  return out;
}

/** The first issue as one sentence, naming its field ("pinCount: must be a whole number"), and the field. */
export function issueSentence(issues: Issue[]): { message: string; field: string | undefined } {
  const first = issues[0];
  const field = first?.path.map(String).join(".") || undefined;
  return { message: field ? `${field}: ${first!.message}` : (first?.message ?? "The request was not understood."), field };
}

/**
 * What every page action answers: a line to show when it worked (`done`), the problems by field (`form` for the whole
 * form) and the values to put back in the form. One shape, so every page shows results the same way.
 */
export interface ActionResult {
  done: string;
  errors: Record<string, string>;
  values: Record<string, string>;
}
export const answered = (done: string): ActionResult => ({ done, errors: {}, values: {} });
export const refusal = (errors: Record<string, string>, values: Record<string, string> = {}): ActionResult => ({ done: "", errors, values });
