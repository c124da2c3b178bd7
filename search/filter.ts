/**
 * Filter expressions of the hosted search service, parsed and evaluated without any I/O (pure; unit-tested in
 * tests/unit/search-filter.test.ts). The syntax is the service's documented one (../shared/STACK.md §4: `filter` is
 * `string | (string | string[])[]`, outer AND, inner OR; the string grammar is the service's public filter expression
 * reference):
 *
 *   expression = or
 *   or         = and ("OR" and)*
 *   and        = not ("AND" not)*            AND binds tighter than OR
 *   not        = "NOT" not | primary
 *   primary    = "(" expression ")" | condition
 *   condition  = attr ( "=" | "!=" | ">" | ">=" | "<" | "<=" ) value
 *              | attr value "TO" value       same as attr >= a AND attr <= b
 *              | attr ["NOT"] "IN" "[" value ("," value)* [","] "]"
 *              | attr ["NOT"] "EXISTS"
 *              | attr "IS" ["NOT"] "NULL"
 *              | attr "IS" ["NOT"] "EMPTY"
 *   attr/value = 'single quoted' | "double quoted" (\ escapes the quote) | a bare word (no spaces, no ()[],'"=!<>)
 *
 * Keywords are upper case, as the service spells them. What a filter selects (the semantics) is in filter-match.ts,
 * whose functions this module re-exports, so importers keep one path.
 */

export type Comparison = "=" | "!=" | ">" | ">=" | "<" | "<=";

export type FilterNode =
  | { type: "and"; children: FilterNode[] }
  | { type: "or"; children: FilterNode[] }
  | { type: "not"; child: FilterNode }
  | { type: "compare"; attribute: string; op: Comparison; value: string }
  | { type: "range"; attribute: string; from: string; to: string }
  | { type: "in"; attribute: string; values: string[] }
  | { type: "exists"; attribute: string }
  | { type: "null"; attribute: string }
  | { type: "empty"; attribute: string }
  | { type: "all" };

/** A filter the grammar cannot read. `message` is worded like the service's (with a `line:column` pointer). */
export class FilterSyntaxError extends Error {
  override name = "FilterSyntaxError";
  constructor(
    message: string,
    readonly start = 0,
    readonly end = 0,
  ) {
    super(message);
  }
}

interface Token {
  kind: "word" | "quoted" | "op" | "(" | ")" | "[" | "]" | ",";
  text: string;
  start: number;
  end: number;
}

const OPERATORS = ["!=", ">=", "<=", "=", ">", "<"] as const;
const BARE_STOP = /[\s()[\],'"=!<>]/;
const KEYWORDS = new Set(["AND", "OR", "NOT", "TO", "IN", "EXISTS", "IS", "NULL", "EMPTY"]);
const EXPECTED_OPERATION =
  "Was expecting an operation `=`, `!=`, `>=`, `>`, `<=`, `<`, `IN`, `NOT IN`, `TO`, `EXISTS`, `NOT EXISTS`, `IS NULL`, `IS NOT NULL`, `IS EMPTY`, `IS NOT EMPTY`";

function pointer(input: string, start: number, end: number): string {
  return `${start + 1}:${Math.max(end, start + 1)} ${input}`;
}

function lex(input: string): Token[] {
  const tokens: Token[] = [];
  let i = 0;
  while (i < input.length) {
    const c = input[i];
    if (/\s/.test(c)) {
      i += 1;
      continue;
    }
    if ("()[],".includes(c)) {
      tokens.push({ kind: c as Token["kind"], text: c, start: i, end: i + 1 });
      i += 1;
      continue;
    }
    const op = OPERATORS.find((o) => input.startsWith(o, i));
    if (op) {
      tokens.push({ kind: "op", text: op, start: i, end: i + op.length });
      i += op.length;
      continue;
    }
    if (c === "!") throw new FilterSyntaxError(`${EXPECTED_OPERATION} at \`!\`.\n${pointer(input, i, i + 1)}`, i, i + 1);
    if (c === "'" || c === '"') {
      let j = i + 1;
      let text = "";
      while (j < input.length && input[j] !== c) {
        if (input[j] === "\\" && j + 1 < input.length) j += 1;
        text += input[j];
        j += 1;
      }
      if (j >= input.length) {
        throw new FilterSyntaxError(
          `Expression \`${input.slice(i)}\` is missing the following closing delimiter: \`${c}\`.\n${pointer(input, i, input.length)}`,
          i,
          input.length,
        );
      }
      tokens.push({ kind: "quoted", text, start: i, end: j + 1 });
      i = j + 1;
      continue;
    }
    let j = i;
    while (j < input.length && !BARE_STOP.test(input[j])) j += 1;
    tokens.push({ kind: "word", text: input.slice(i, j), start: i, end: j });
    i = j;
  }
  return tokens;
}

class Parser {
  private pos = 0;
  constructor(
    private readonly input: string,
    private readonly tokens: Token[],
  ) {}

  parse(): FilterNode {
    if (this.tokens.length === 0) return { type: "all" };
    const node = this.or();
    const extra = this.peek();
    if (extra)
      this.fail(
        `Found unexpected characters at the end of the filter: \`${this.input.slice(extra.start)}\`. You probably forgot an \`OR\` or an \`AND\` rule.`,
        extra,
      );
    return node;
  }

  private peek(offset = 0): Token | undefined {
    return this.tokens[this.pos + offset];
  }

  private isKeyword(word: string, offset = 0): boolean {
    const t = this.peek(offset);
    return t?.kind === "word" && t.text === word;
  }

  private fail(message: string, at?: Token): never {
    const start = at?.start ?? this.input.length;
    const end = at?.end ?? this.input.length;
    throw new FilterSyntaxError(`${message}\n${pointer(this.input, start, end)}`, start, end);
  }

  private or(): FilterNode {
    const children = [this.and()];
    while (this.isKeyword("OR")) {
      this.pos += 1;
      children.push(this.and());
    }
    return children.length === 1 ? children[0] : { type: "or", children };
  }

  private and(): FilterNode {
    const children = [this.not()];
    while (this.isKeyword("AND")) {
      this.pos += 1;
      children.push(this.not());
    }
    return children.length === 1 ? children[0] : { type: "and", children };
  }

  private not(): FilterNode {
    if (this.isKeyword("NOT")) {
      this.pos += 1;
      return { type: "not", child: this.not() };
    }
    return this.primary();
  }

  private primary(): FilterNode {
    const t = this.peek();
    if (!t) this.fail("Was expecting a value but instead got nothing.");
    if (t.kind === "(") {
      this.pos += 1;
      const inner = this.or();
      const close = this.peek();
      if (close?.kind !== ")") this.fail(`Expression \`${this.input.slice(t.start)}\` is missing the following closing delimiter: \`)\`.`, close ?? t);
      this.pos += 1;
      return inner;
    }
    return this.condition();
  }

  /** A value (attribute name or operand): a quoted string or a bare word that is not a keyword. */
  private value(what: string): string {
    const t = this.peek();
    if (!t) this.fail(`Was expecting ${what} but instead got nothing.`);
    if (t.kind === "quoted") {
      this.pos += 1;
      return t.text;
    }
    if (t.kind === "word" && !KEYWORDS.has(t.text)) {
      this.pos += 1;
      return t.text;
    }
    if (t.kind === "word") this.fail(`Was expecting ${what} but instead got the reserved keyword \`${t.text}\`.`, t);
    this.fail(`Was expecting ${what} but instead got \`${t.text}\`.`, t);
  }

  private condition(): FilterNode {
    const attrToken = this.peek()!;
    const attribute = this.value("a value");
    const t = this.peek();
    if (!t) this.fail(`${EXPECTED_OPERATION} at \`${this.input.slice(attrToken.start)}\`.`, attrToken);
    if (t.kind === "op") {
      this.pos += 1;
      const value = this.value("a value");
      return { type: "compare", attribute, op: t.text as Comparison, value };
    }
    if (t.kind === "word") {
      if (t.text === "EXISTS") {
        this.pos += 1;
        return { type: "exists", attribute };
      }
      if (t.text === "IN") {
        this.pos += 1;
        return { type: "in", attribute, values: this.list() };
      }
      if (t.text === "NOT" && this.isKeyword("EXISTS", 1)) {
        this.pos += 2;
        return { type: "not", child: { type: "exists", attribute } };
      }
      if (t.text === "NOT" && this.isKeyword("IN", 1)) {
        this.pos += 2;
        return { type: "not", child: { type: "in", attribute, values: this.list() } };
      }
      if (t.text === "IS") {
        this.pos += 1;
        let negate = false;
        if (this.isKeyword("NOT")) {
          negate = true;
          this.pos += 1;
        }
        const what = this.peek();
        let node: FilterNode;
        if (what?.kind === "word" && what.text === "NULL") node = { type: "null", attribute };
        else if (what?.kind === "word" && what.text === "EMPTY") node = { type: "empty", attribute };
        else this.fail(`${EXPECTED_OPERATION} at \`${this.input.slice(attrToken.start, (what ?? t).end)}\`.`, what ?? t);
        this.pos += 1;
        return negate ? { type: "not", child: node } : node;
      }
    }
    if ((t.kind === "word" && !KEYWORDS.has(t.text)) || t.kind === "quoted") {
      // attr a TO b
      if (this.isKeyword("TO", 1)) {
        const from = this.value("a value");
        this.pos += 1; // TO
        const to = this.value("a value");
        return { type: "range", attribute, from, to };
      }
    }
    this.fail(`${EXPECTED_OPERATION} at \`${this.input.slice(attrToken.start, t.end)}\`.`, t);
  }

  private list(): string[] {
    const open = this.peek();
    if (open?.kind !== "[") this.fail("Expected `[` after `IN` keyword.", open);
    this.pos += 1;
    const values: string[] = [];
    for (;;) {
      const t = this.peek();
      if (!t) this.fail(`Expected matching \`]\` after the list of values.`, open);
      if (t.kind === "]") {
        this.pos += 1;
        return values;
      }
      values.push(this.value("a value"));
      const sep = this.peek();
      if (sep?.kind === ",") this.pos += 1;
      else if (sep?.kind !== "]") this.fail("Expected only comma-separated field names inside `IN[..]`.", sep ?? open);
    }
  }
}

/** Parse one filter expression string. Throws FilterSyntaxError. An empty (or blank) string selects everything. */
export function parseFilterExpression(input: string): FilterNode {
  return new Parser(input, lex(input)).parse();
}

/**
 * Parse the `filter` search parameter in either of its forms (STACK.md §4): a string expression, or an array whose
 * items are ANDed, an item itself being a string or an array of strings that are ORed. `null`/`undefined` select all.
 */
export function parseFilter(filter: unknown): FilterNode {
  if (filter === null || filter === undefined) return { type: "all" };
  if (typeof filter === "string") return parseFilterExpression(filter);
  if (!Array.isArray(filter)) {
    throw new FilterSyntaxError(`Invalid syntax for the filter parameter: \`expected String, Array, found: ${describe(filter)}\`.`);
  }
  const children: FilterNode[] = [];
  for (const item of filter) {
    if (typeof item === "string") children.push(parseFilterExpression(item));
    else if (Array.isArray(item)) {
      const alternatives = item.map((inner) => {
        if (typeof inner !== "string") {
          throw new FilterSyntaxError(`Invalid syntax for the filter parameter: \`expected String, found: ${describe(inner)}\`.`);
        }
        return parseFilterExpression(inner);
      });
      children.push(alternatives.length === 1 ? alternatives[0] : { type: "or", children: alternatives });
    } else {
      throw new FilterSyntaxError(`Invalid syntax for the filter parameter: \`expected String, Array, found: ${describe(item)}\`.`);
    }
  }
  const useful = children.filter((c) => c.type !== "all");
  if (useful.length === 0) return { type: "all" };
  return useful.length === 1 ? useful[0] : { type: "and", children: useful };
}

function describe(v: unknown): string {
  return JSON.stringify(v) ?? String(v);
}

/** Every attribute a filter mentions (to check them against filterableAttributes). */
export function filterAttributes(node: FilterNode): string[] {
  const out = new Set<string>();
  const walk = (n: FilterNode) => {
    if (n.type === "and" || n.type === "or") n.children.forEach(walk);
    else if (n.type === "not") walk(n.child);
    else if (n.type !== "all") out.add(n.attribute);
  };
  walk(node);
  return [...out];
}

export { attributeAllowed, facetValues, lookup, matchesFilter } from "./filter-match.ts";
