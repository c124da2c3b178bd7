/**
 * An index's settings as the service keeps them: their shape and defaults, the settings the stand-in knows (with the
 * kebab-case route segment of each), validating one value and applying it. Pure, no I/O.
 */
import { ApiError } from "./errors.ts";

/** The settings object as GET /indexes/:uid/settings returns it (defaults of the service). */
export interface Settings {
  displayedAttributes: string[];
  searchableAttributes: string[];
  filterableAttributes: unknown[];
  sortableAttributes: string[];
  rankingRules: string[];
  stopWords: string[];
  nonSeparatorTokens: string[];
  separatorTokens: string[];
  dictionary: string[];
  synonyms: Record<string, string[]>;
  distinctAttribute: string | null;
  proximityPrecision: string;
  typoTolerance: {
    enabled: boolean;
    minWordSizeForTypos: { oneTypo: number; twoTypos: number };
    disableOnWords: string[];
    disableOnAttributes: string[];
    disableOnNumbers: boolean;
  };
  faceting: { maxValuesPerFacet: number; sortFacetValuesBy: Record<string, "alpha" | "count"> };
  pagination: { maxTotalHits: number };
  embedders: Record<string, unknown>;
  searchCutoffMs: number | null;
  localizedAttributes: unknown[] | null;
  facetSearch: boolean;
  prefixSearch: "indexingTime" | "disabled";
  [other: string]: unknown;
}

export function defaultSettings(): Settings {
  return {
    displayedAttributes: ["*"],
    searchableAttributes: ["*"],
    filterableAttributes: [],
    sortableAttributes: [],
    rankingRules: ["words", "typo", "proximity", "attribute", "sort", "exactness"],
    stopWords: [],
    nonSeparatorTokens: [],
    separatorTokens: [],
    dictionary: [],
    synonyms: {},
    distinctAttribute: null,
    proximityPrecision: "byWord",
    typoTolerance: {
      enabled: true,
      minWordSizeForTypos: { oneTypo: 5, twoTypos: 9 },
      disableOnWords: [],
      disableOnAttributes: [],
      disableOnNumbers: false,
    },
    faceting: { maxValuesPerFacet: 100, sortFacetValuesBy: { "*": "alpha" } },
    pagination: { maxTotalHits: 1000 },
    embedders: {},
    searchCutoffMs: null,
    localizedAttributes: null,
    facetSearch: true,
    prefixSearch: "indexingTime",
  };
}

/** The settings the stand-in knows, by camelCase name, with the kebab-case route segment and a validator. */
type Kind = "strings" | "stringsOrNull" | "filterable" | "synonyms" | "stringOrNull" | "object" | "boolean" | "numberOrNull" | "string" | "any";
export const SETTINGS: Record<string, { route: string; kind: Kind }> = {
  displayedAttributes: { route: "displayed-attributes", kind: "strings" },
  searchableAttributes: { route: "searchable-attributes", kind: "strings" },
  filterableAttributes: { route: "filterable-attributes", kind: "filterable" },
  sortableAttributes: { route: "sortable-attributes", kind: "strings" },
  rankingRules: { route: "ranking-rules", kind: "strings" },
  stopWords: { route: "stop-words", kind: "strings" },
  nonSeparatorTokens: { route: "non-separator-tokens", kind: "strings" },
  separatorTokens: { route: "separator-tokens", kind: "strings" },
  dictionary: { route: "dictionary", kind: "strings" },
  synonyms: { route: "synonyms", kind: "synonyms" },
  distinctAttribute: { route: "distinct-attribute", kind: "stringOrNull" },
  proximityPrecision: { route: "proximity-precision", kind: "string" },
  typoTolerance: { route: "typo-tolerance", kind: "object" },
  faceting: { route: "faceting", kind: "object" },
  pagination: { route: "pagination", kind: "object" },
  embedders: { route: "embedders", kind: "object" },
  searchCutoffMs: { route: "search-cutoff-ms", kind: "numberOrNull" },
  localizedAttributes: { route: "localized-attributes", kind: "any" },
  facetSearch: { route: "facet-search", kind: "boolean" },
  prefixSearch: { route: "prefix-search", kind: "string" },
};

const snake = (camel: string) => camel.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

function typeName(v: unknown): string {
  if (v === null) return "null";
  if (Array.isArray(v)) return "an array";
  if (typeof v === "object") return "an object";
  return `a ${typeof v === "number" ? "number" : typeof v}`;
}

/** Validate one setting's value (null = reset). Throws ApiError 400 `invalid_settings_<name>`. */
export function validateSetting(name: string, value: unknown): void {
  const spec = SETTINGS[name];
  const bad = (expected: string): never => {
    throw new ApiError(
      400,
      `invalid_settings_${snake(name)}`,
      `Invalid value type at \`.${name}\`: expected ${expected}, but found ${typeName(value)}: \`${JSON.stringify(value)}\``,
    );
  };
  if (value === null) return;
  switch (spec.kind) {
    case "strings":
    case "stringsOrNull":
      if (!Array.isArray(value) || value.some((v) => typeof v !== "string")) bad("an array of strings");
      return;
    case "filterable":
      if (!Array.isArray(value)) bad("an array");
      for (const v of value as unknown[]) {
        if (typeof v === "string") continue;
        const patterns = (v as { attributePatterns?: unknown })?.attributePatterns;
        if (!v || typeof v !== "object" || !Array.isArray(patterns) || patterns.some((p) => typeof p !== "string")) {
          bad("an array of strings or of objects with `attributePatterns`");
        }
      }
      return;
    case "synonyms":
      if (typeof value !== "object" || Array.isArray(value)) bad("an object");
      for (const list of Object.values(value as object)) if (!Array.isArray(list) || list.some((v) => typeof v !== "string")) bad("an object of string arrays");
      return;
    case "stringOrNull":
    case "string":
      if (typeof value !== "string") bad("a string");
      return;
    case "object":
      if (typeof value !== "object" || Array.isArray(value)) bad("an object");
      return;
    case "boolean":
      if (typeof value !== "boolean") bad("a boolean");
      return;
    case "numberOrNull":
      if (typeof value !== "number" || !Number.isInteger(value) || value < 0) bad("a positive integer");
      return;
    case "any":
      return;
  }
}

/** Apply one setting (already validated): null resets it; object settings (typoTolerance, faceting, pagination) merge. */
export function applySetting(settings: Settings, name: string, value: unknown): void {
  const defaults = defaultSettings();
  if (value === null) {
    settings[name] = defaults[name];
    return;
  }
  if (SETTINGS[name].kind === "object" && name !== "embedders") {
    const current = settings[name] as Record<string, unknown>;
    const merged: Record<string, unknown> = { ...current };
    for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
      const base = (defaults[name] as Record<string, unknown>)[k];
      if (v === null) merged[k] = base;
      else if (v && typeof v === "object" && !Array.isArray(v) && base && typeof base === "object" && !Array.isArray(base)) {
        merged[k] = { ...(current[k] as object), ...(v as object) };
      } else merged[k] = v;
    }
    settings[name] = merged;
    return;
  }
  settings[name] = value;
}

/** The attribute patterns a filterableAttributes setting allows (strings, or `attributePatterns` of granular entries). */
export function filterablePatterns(settings: Settings): string[] {
  const out: string[] = [];
  for (const f of settings.filterableAttributes) {
    if (typeof f === "string") out.push(f);
    else out.push(...((f as { attributePatterns: string[] }).attributePatterns ?? []));
  }
  return out;
}
