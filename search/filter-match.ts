/**
 * What a parsed filter (filter.ts) selects: evaluating a FilterNode against a document, and the dotted-path lookups
 * that facets and sorting share. Pure, no I/O (unit-tested through filter.ts in tests/unit/search-filter.test.ts).
 *
 * Semantics, as the service documents them:
 *   - `=` on strings is case-insensitive; a number matches a number or its text; `=` never matches null or an empty array.
 *   - `!=` selects every document `=` does not select (so also documents without the attribute); `NOT x` likewise.
 *   - an attribute holding an array matches when any element matches (`size > 5 AND size < 5` can select [2, 20]).
 *   - `>`, `>=`, `<`, `<=`, `TO` compare numbers; with a value that is not a number they compare strings
 *     case-insensitively (the stand-in's choice for non-numeric bounds).
 *   - `EXISTS`: the attribute is present (even when null or empty); `IS NULL`: its value is null; `IS EMPTY`: "", [] or {}.
 *   - nested attributes use dot notation (`rating.users`).
 */
import type { Comparison, FilterNode } from "./filter.ts";

/** A marker for "the path is present but holds null" (distinct from "absent"). */
interface Lookup {
  present: boolean;
  /** Leaf values (arrays flattened); null kept so IS NULL can see it. */
  values: unknown[];
  /** The raw values found at the path (before flattening), for IS EMPTY. */
  raw: unknown[];
}

/**
 * The values at a dotted path. `a.b` reads `doc.a.b`, `doc["a.b"]`, and through arrays of objects (`a: [{b: 1}, {b: 2}]`
 * gives [1, 2]), as the service flattens nested documents.
 */
export function lookup(doc: unknown, path: string): Lookup {
  const result: Lookup = { present: false, values: [], raw: [] };
  if (!path.includes(".")) {
    // fast path: a top-level attribute
    if (doc !== null && typeof doc === "object" && !Array.isArray(doc) && Object.hasOwn(doc, path)) {
      const v = (doc as Record<string, unknown>)[path];
      result.present = true;
      result.raw.push(v);
      flatten(v, result.values);
    }
    return result;
  }
  const visit = (node: unknown, rest: string) => {
    if (Array.isArray(node)) {
      for (const item of node) if (item !== null && typeof item === "object") visit(item, rest);
      return;
    }
    if (node === null || typeof node !== "object") return;
    const obj = node as Record<string, unknown>;
    if (Object.hasOwn(obj, rest)) {
      result.present = true;
      result.raw.push(obj[rest]);
      flatten(obj[rest], result.values);
    }
    for (let dot = rest.indexOf("."); dot !== -1; dot = rest.indexOf(".", dot + 1)) {
      const head = rest.slice(0, dot);
      if (Object.hasOwn(obj, head)) visit(obj[head], rest.slice(dot + 1));
    }
  };
  visit(doc, path);
  return result;
}

function flatten(v: unknown, out: unknown[]) {
  if (Array.isArray(v)) for (const x of v) flatten(x, out);
  else out.push(v);
}

/** The values at a path as the service's facets see them: strings, finite numbers and booleans (arrays flattened). */
export function facetValues(doc: unknown, path: string): (string | number | boolean)[] {
  return lookup(doc, path).values.filter(
    (v): v is string | number | boolean => typeof v === "string" || typeof v === "boolean" || (typeof v === "number" && Number.isFinite(v)),
  );
}

const asNumber = (s: string): number | null => {
  if (s.trim() === "") return null;
  const n = Number(s);
  return Number.isFinite(n) ? n : null;
};

function equals(docValue: unknown, value: string): boolean {
  if (typeof docValue === "number") {
    const n = asNumber(value);
    return n !== null ? n === docValue : String(docValue) === value;
  }
  if (typeof docValue === "string") return docValue.toLowerCase() === value.toLowerCase();
  if (typeof docValue === "boolean") return String(docValue) === value.toLowerCase();
  return false;
}

function compare(docValue: unknown, op: Comparison, value: string): boolean {
  const n = asNumber(value);
  let c: number;
  if (n !== null) {
    if (typeof docValue !== "number") return false;
    c = docValue - n;
  } else {
    if (typeof docValue !== "string") return false;
    const a = docValue.toLowerCase();
    const b = value.toLowerCase();
    c = a < b ? -1 : a > b ? 1 : 0;
  }
  switch (op) {
    case ">":
      return c > 0;
    case ">=":
      return c >= 0;
    case "<":
      return c < 0;
    case "<=":
      return c <= 0;
    default:
      return false;
  }
}

const isEmptyValue = (v: unknown) =>
  v === "" || (Array.isArray(v) && v.length === 0) || (v !== null && typeof v === "object" && !Array.isArray(v) && Object.keys(v).length === 0);

/** Does the document satisfy the filter? */
export function matchesFilter(node: FilterNode, doc: unknown): boolean {
  switch (node.type) {
    case "all":
      return true;
    case "and":
      return node.children.every((c) => matchesFilter(c, doc));
    case "or":
      return node.children.some((c) => matchesFilter(c, doc));
    case "not":
      return !matchesFilter(node.child, doc);
    case "compare": {
      if (node.op === "!=") return !lookup(doc, node.attribute).values.some((v) => equals(v, node.value));
      const values = lookup(doc, node.attribute).values;
      if (node.op === "=") return values.some((v) => equals(v, node.value));
      return values.some((v) => compare(v, node.op, node.value));
    }
    case "range":
      return lookup(doc, node.attribute).values.some((v) => compare(v, ">=", node.from) && compare(v, "<=", node.to));
    case "in": {
      const values = lookup(doc, node.attribute).values;
      return values.some((v) => node.values.some((want) => equals(v, want)));
    }
    case "exists":
      return lookup(doc, node.attribute).present;
    case "null":
      return lookup(doc, node.attribute).raw.some((v) => v === null);
    case "empty":
      return lookup(doc, node.attribute).raw.some(isEmptyValue);
  }
}

/**
 * Is `attribute` covered by one of the patterns (filterableAttributes / sortableAttributes entries)? An entry covers
 * itself and its nested fields (`rating` covers `rating.users`); `*` wildcards match any run of characters.
 */
export function attributeAllowed(attribute: string, patterns: readonly string[]): boolean {
  return patterns.some((p) => {
    if (p === attribute || attribute.startsWith(`${p}.`)) return true;
    if (!p.includes("*")) return false;
    const re = new RegExp(
      `^${p
        .split("*")
        .map((s) => s.replace(/[.*+?^${}()|[\]\\]/g, "\\$&"))
        .join(".*")}$`,
    );
    return re.test(attribute);
  });
}
