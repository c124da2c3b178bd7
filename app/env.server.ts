/**
 * Every setting of the app, read from the environment once, at start, and checked (zod). A bad value (a typo in
 * PHOTO_MAX_BYTES, an unknown SEARCH_URL scheme) stops start-up with a message naming the variable, instead of the old
 * silent fall-back to the default. Nothing else in app/ or db/ reads `process.env` for a setting: import `env` from here.
 * (The stand-ins in search/ and mail/ have their own small checked settings; test-only fault switches are read by
 * app/services/faults.server.ts, which production never loads them into.) README's "Configuration" table lists them.
 */
import { availableParallelism } from "node:os";
import path from "node:path";
import { z } from "zod";

const KiB = 1024;
const MiB = 1024 * KiB;

// An unset or empty variable takes the default; anything else must parse.
const blank = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);
const whole = (what: string, min: number, max = Number.MAX_SAFE_INTEGER) =>
  z.preprocess(
    blank,
    z.coerce
      .number({ error: `expected ${what}` })
      .int(`expected ${what} (a whole number)`)
      .min(min, `expected ${what} of at least ${min}`)
      .max(max, `expected ${what} of at most ${max}`),
  );
const onOff = z.preprocess(blank, z.enum(["on", "off"], { error: "expected on or off" }).default("on"));
const text = z.preprocess(blank, z.string().optional());
/** A URL of one of these schemes; the message never repeats the value (it may carry a password). */
const url = (schemes: string[], fallback: string) =>
  z.preprocess(blank, z.string().default(fallback)).refine(
    (s) => {
      try {
        return schemes.includes(new URL(s).protocol.replace(/:$/, ""));
      } catch {
        return false;
      }
    },
    `expected a ${schemes.join(" or ")} URL`,
  );

const schema = z.object({
  NODE_ENV: z.preprocess(blank, z.enum(["production", "development", "test"]).default("production")),
  PORT: whole("a port", 0, 65535).default(3000), // 0: any free port (tests)
  HOST: text,
  APP_URL: z
    .preprocess(blank, z.string().optional())
    .refine((s) => s === undefined || /^https?:\/\/[^/\s]+\/?$/.test(s), "expected an origin such as https://loomlore.example (http or https, no path)"),
  ALLOWED_ORIGINS: text,
  TRUST_PROXY: text,

  // npm start (app/start.server.ts) only
  REBUILD: z.preprocess(blank, z.enum(["0", "1"], { error: "expected 1 (rebuild) or 0" }).default("0")).transform((v) => v === "1"),
  MAIL_STANDIN: onOff,
  SEARCH_STANDIN: onOff,

  DB_PATH: z.preprocess(blank, z.string().default(path.resolve(process.cwd(), "db/data/loomlore.sqlite"))),
  DB_BUSY_TIMEOUT_MS: whole("milliseconds", 0, 600_000).default(5000),
  SEED_DEMO: z.preprocess(blank, z.enum(["true", "false"], { error: "expected true or false" }).default("true")).transform((v) => v === "true"),

  SMTP_URL: url(["smtp", "smtps"], "smtp://127.0.0.1:2525"),
  MAIL_FROM: z.preprocess(blank, z.string().default("Loomlore <no-reply@loomlore.invalid>")),
  MAIL_TIMEOUT_MS: whole("milliseconds", 1, 600_000).default(5000),
  MAIL_POLL_MS: whole("milliseconds", 1, 3_600_000).default(2000),
  MAIL_WORKER: onOff,
  MAIL_HTTP_URL: z.preprocess(blank, z.string().optional()).refine((s) => s === undefined || /^https?:\/\//.test(s), "expected an http URL"),
  MAIL_HTTP_PORT: whole("a port", 1, 65535).default(8025),

  BCRYPT_COST: whole("a bcrypt work factor", 10, 20).default(12), // OWASP ASVS V2.4.4: never below 10
  BCRYPT_WORKERS: whole("a number of worker threads", 0, 64).default(Math.max(1, availableParallelism() - 1)),
  BCRYPT_QUEUE_MAX: whole("a queue length", 1, 1000).optional(),

  SEARCH_URL: url(["http", "https"], "http://127.0.0.1:7700"),
  SEARCH_KEY: text,
  SEARCH_INDEX: z.preprocess(
    blank,
    z
      .string()
      .regex(/^[A-Za-z0-9_-]{1,100}$/, "expected an index name (letters, digits, - and _)")
      .default("library"),
  ),
  SEARCH_TIMEOUT_MS: whole("milliseconds", 1, 60_000).default(300),
  SEARCH_WORK_TIMEOUT_MS: whole("milliseconds", 1, 600_000).default(10_000),
  SEARCH_TASK_TIMEOUT_MS: whole("milliseconds", 1, 3_600_000).default(60_000),
  SEARCH_BREAKER_MS: whole("milliseconds", 1, 3_600_000).default(30_000),
  SEARCH_POLL_MS: whole("milliseconds", 1, 3_600_000).default(2000),
  SEARCH_WORKER: onOff,

  UPLOADS_DIR: z.preprocess(blank, z.string().default(path.join(process.cwd(), "uploads"))).transform((p) => path.resolve(p)),
  PHOTO_MAX_BYTES: whole("a number of bytes", 1).default(15 * MiB),
  PHOTO_PER_SUBMISSION: whole("a number of photos", 1).default(12),
  PHOTO_PER_REQUEST: whole("a number of photos", 1).default(12),
  PHOTO_USER_COUNT: whole("a number of photos", 1).default(60),
  PHOTO_USER_BYTES: whole("a number of bytes", 1).default(200 * MiB),
  PHOTO_PER_MINUTE: whole("a number of uploads", 1).default(20),
  PHOTO_MAX_PIXELS: whole("a number of pixels", 1).default(50_000_000),
  PHOTO_PIPELINES: whole("a number of pipelines", 1, 64).default(Math.max(1, availableParallelism() - 1)),
  PHOTO_SWEEPER: onOff,

  FORM_MAX_BYTES: whole("a number of bytes", 1).default(64 * KiB),
  EDITOR_FORM_MAX_BYTES: whole("a number of bytes", 1).default(1 * MiB),
  UPLOAD_GRACE_MS: whole("milliseconds", 1).default(10_000),
  UPLOAD_MIN_BPS: whole("bytes per second", 1).default(10 * KiB),
  HEADERS_TIMEOUT_MS: whole("milliseconds", 1, 20_000).default(20_000),
});

export type Settings = z.infer<typeof schema>;

/** A setting that does not parse: every bad variable named, with what was expected (never the value). */
export class SettingsError extends Error {
  constructor(readonly problems: { variable: string; expected: string }[]) {
    super(`Loomlore cannot start: ${problems.map((p) => `${p.variable}: ${p.expected}`).join("; ")}.`);
    this.name = "SettingsError";
  }
}

/** Parse a set of variables (the process's environment, or a test's) into settings, or throw SettingsError. */
export function parseSettings(source: Record<string, string | undefined>): Settings {
  const parsed = schema.safeParse(source);
  if (parsed.success) return parsed.data;
  throw new SettingsError(parsed.error.issues.map((i) => ({ variable: String(i.path[0] ?? "?"), expected: i.message })));
}

/**
 * The app's settings, read once when the process loads them. A bad value ends the process here with one line naming
 * each bad variable (exit 1): nothing has started yet, and nothing would work right on a silent default.
 */
export const env: Settings = (() => {
  try {
    return parseSettings(process.env);
  } catch (e) {
    if (!(e instanceof SettingsError)) throw e;
    console.error(`[loomlore] ${e.message}`);
    process.exit(1);
  }
})();

/** Where links in mail point (never taken from the request). */
export const appUrl = () => (env.APP_URL ?? `http://localhost:${env.PORT}`).replace(/\/$/, "");
