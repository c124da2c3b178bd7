/**
 * POST /indexes/:uid/search (the body) and GET /indexes/:uid/search (query parameters): checked, then searched.
 */
import type { SearchRequest } from "../engine.ts";
import { requireIndex } from "../apply.ts";
import { ApiError } from "../errors.ts";
import { asObject, badType, jsonBody, nonNegativeInt, rejectUnknown, send } from "../http.ts";
import type { Handler } from "../routes.ts";

export const search: Handler = async ({ req, res, method, params, uid, state }) => {
  const raw = method === "POST" ? asObject(await jsonBody(req)) : searchParamsFromQuery(params);
  const request = searchRequest(raw);
  send(res, 200, requireIndex(state.indexes, uid).search(request));
};

const SEARCH_FIELDS = [
  "q",
  "offset",
  "limit",
  "page",
  "hitsPerPage",
  "filter",
  "facets",
  "sort",
  "attributesToRetrieve",
  "attributesToHighlight",
  "highlightPreTag",
  "highlightPostTag",
  "attributesToCrop",
  "cropLength",
  "cropMarker",
  "showMatchesPosition",
  "matchingStrategy",
  "showRankingScore",
  "showRankingScoreDetails",
  "rankingScoreThreshold",
  "attributesToSearchOn",
  "distinct",
  "vector",
  "hybrid",
  "retrieveVectors",
  "locales",
  "showPerformanceDetails",
  "media",
  "personalize",
  // GET spellings of `hybrid` (accepted, like the vector options, and ignored: the stand-in has no embedders)
  "hybridEmbedder",
  "hybridSemanticRatio",
] as const;

/** Validate a search body (POST) or the query parameters already parsed from GET. */
function searchRequest(raw: Record<string, unknown>): SearchRequest {
  rejectUnknown(raw, SEARCH_FIELDS);
  const r: SearchRequest = {};
  const strings = (field: string, v: unknown): string[] | undefined => {
    if (v === null || v === undefined) return undefined;
    if (!Array.isArray(v) || v.some((x) => typeof x !== "string"))
      badType(`invalid_search_${field.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`, field, "an array", v);
    return v as string[];
  };
  if (raw.q !== undefined && raw.q !== null && typeof raw.q !== "string") badType("invalid_search_q", "q", "a string", raw.q);
  r.q = (raw.q as string | null | undefined) ?? null;
  for (const f of ["offset", "limit", "page", "hitsPerPage", "cropLength"] as const) {
    if (raw[f] !== undefined && raw[f] !== null) r[f] = nonNegativeInt(`invalid_search_${f.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`, f, raw[f]);
  }
  if (raw.filter !== undefined && raw.filter !== null && typeof raw.filter !== "string" && !Array.isArray(raw.filter)) {
    throw new ApiError(
      400,
      "invalid_search_filter",
      `Invalid syntax for the filter parameter: \`expected String, Array, found: ${JSON.stringify(raw.filter)}\`.`,
    );
  }
  r.filter = raw.filter;
  r.facets = strings("facets", raw.facets);
  r.sort = strings("sort", raw.sort);
  r.attributesToRetrieve = strings("attributesToRetrieve", raw.attributesToRetrieve);
  r.attributesToHighlight = strings("attributesToHighlight", raw.attributesToHighlight);
  r.attributesToCrop = strings("attributesToCrop", raw.attributesToCrop);
  r.attributesToSearchOn = strings("attributesToSearchOn", raw.attributesToSearchOn) ?? null;
  for (const f of ["highlightPreTag", "highlightPostTag", "cropMarker", "distinct"] as const) {
    if (raw[f] !== undefined && raw[f] !== null) {
      if (typeof raw[f] !== "string") badType(`invalid_search_${f.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`, f, "a string", raw[f]);
      r[f] = raw[f] as string;
    }
  }
  if (raw.matchingStrategy !== undefined && raw.matchingStrategy !== null) {
    if (!["last", "all", "frequency"].includes(raw.matchingStrategy as string)) {
      throw new ApiError(
        400,
        "invalid_search_matching_strategy",
        `Unknown value \`${String(raw.matchingStrategy)}\` at \`.matchingStrategy\`: expected one of \`last\`, \`all\`, \`frequency\``,
      );
    }
    r.matchingStrategy = raw.matchingStrategy as SearchRequest["matchingStrategy"];
  }
  if (raw.showRankingScore !== undefined && raw.showRankingScore !== null) {
    if (typeof raw.showRankingScore !== "boolean") badType("invalid_search_show_ranking_score", "showRankingScore", "a boolean", raw.showRankingScore);
    r.showRankingScore = raw.showRankingScore;
  }
  return r;
}

/** GET /indexes/:uid/search query parameters → the POST body shape (lists are comma-joined by the client, STACK.md §4). */
function searchParamsFromQuery(params: URLSearchParams): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  const lists = new Set(["facets", "sort", "attributesToRetrieve", "attributesToHighlight", "attributesToCrop", "attributesToSearchOn", "locales"]);
  const numbers = new Set(["offset", "limit", "page", "hitsPerPage", "cropLength", "rankingScoreThreshold"]);
  const booleans = new Set(["showMatchesPosition", "showRankingScore", "showRankingScoreDetails", "retrieveVectors", "showPerformanceDetails"]);
  for (const [k, v] of params) {
    if (lists.has(k)) out[k] = v === "" ? [] : v.split(",").map((s) => s.trim());
    else if (numbers.has(k)) {
      const n = Number(v);
      if (v.trim() === "" || !Number.isFinite(n)) {
        throw new ApiError(
          400,
          `invalid_search_${k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`,
          `Invalid value in parameter \`${k}\`: could not parse \`${v}\` as a positive integer`,
        );
      }
      out[k] = n;
    } else if (booleans.has(k)) {
      if (v !== "true" && v !== "false")
        throw new ApiError(
          400,
          "bad_request",
          `Invalid value in parameter \`${k}\`: could not parse \`${v}\` as a boolean, expected either \`true\` or \`false\``,
        );
      out[k] = v === "true";
    } else out[k] = v;
  }
  return out;
}
