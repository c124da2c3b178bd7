import { redactTokens } from "~/domain/mail-templates";
import { env } from "~/env.server";

/**
 * Read what the local mail stand-in captured (admin page), with single-use tokens redacted before the text leaves this
 * module (the page's data is serialised into the HTML); with a real relay configured there is nothing to read.
 */
const LIST_URL = () => (env.MAIL_HTTP_URL ?? `http://127.0.0.1:${env.MAIL_HTTP_PORT}`).replace(/\/$/, "");

export interface CapturedMail {
  id: string;
  to: string;
  subject: string;
  text: string;
  receivedAt: string;
}

/** The newest captured messages, or the reason they could not be read. */
export async function capturedMail(limit: number): Promise<{ ok: true; messages: CapturedMail[] } | { ok: false; error: string }> {
  try {
    const r = await fetch(`${LIST_URL()}/messages`, { signal: AbortSignal.timeout(1500) });
    if (!r.ok) return { ok: false, error: `HTTP ${r.status}` };
    const list = (await r.json()) as { id?: string; messageId?: string; to: string | string[]; subject: string; text: string; receivedAt: string }[];
    return {
      ok: true,
      messages: list.slice(0, limit).map((m, i) => ({
        id: String(m.id ?? m.messageId ?? i),
        to: Array.isArray(m.to) ? m.to.join(", ") : String(m.to),
        subject: m.subject,
        text: redactTokens(m.text ?? ""),
        receivedAt: m.receivedAt,
      })),
    };
  } catch (e) {
    return { ok: false, error: e instanceof Error ? e.name : "unreachable" };
  }
}
