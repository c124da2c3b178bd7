/** A moderator's decision forms: on a submission (approve, return with a question, decline with a reason) or a report. */
import { z } from "zod";
import { LIMITS } from "~/domain/submissions";

const message = z
  .string()
  .default("")
  .transform((s) => s.slice(0, LIMITS.message));

export const reportDecisionForm = z.object({
  decision: z.enum(["resolved", "dismissed"], { error: "Choose what to do with the report." }),
  message,
});

export const submissionDecisionForm = z
  .object({
    decision: z.enum(["approve", "return", "decline"], { error: "Choose approve, return or decline." }),
    message,
    // The version the moderator read; a missing or garbled one is no version at all (0), which the service answers with
    // its 409 "changed since you opened it" like any other stale version.
    version: z.coerce.number().int().catch(0),
  })
  .superRefine((f, ctx) => {
    if (f.decision !== "approve" && !f.message.trim()) {
      ctx.addIssue({
        code: "custom",
        path: ["message"],
        message: f.decision === "return" ? "Write the question the contributor should answer." : "Give the reason for declining; the contributor reads it.",
      });
    }
  });
