/**
 * The library as search documents (app/domain/search-docs.ts), read from the published tables, and the database's
 * own full-text copy of them (the FTS5 table `search_fts`, the fallback when the search service is away).
 */
import { QueryTypes, type Transaction } from "sequelize";
import type { ColourSystemId } from "../app/domain/colours/index.ts";
import { connectorDocs, familyDoc, type FamilyInput, type SearchDoc } from "../app/domain/search-docs.ts";
import { sequelize } from "./index.server.ts";
import { Connector, Family, Make, Pin, System } from "./models/index.ts";

/** Documents for the whole library, or for some families (their own documents) and some connector cards (card + pins). */
export async function libraryDocs(scope: { familyIds?: number[]; connectorIds?: number[] } | null = null, transaction?: Transaction): Promise<SearchDoc[]> {
  const whole = scope === null;
  const connectors = await Connector.findAll({ where: whole ? {} : { id: scope.connectorIds ?? [] }, order: [["id", "ASC"]], transaction });
  const familyIds = whole ? undefined : [...new Set([...(scope.familyIds ?? []), ...connectors.map((c) => c.familyId)])];
  const families = await Family.findAll({
    where: familyIds ? { id: familyIds } : {},
    include: [{ model: Make, as: "make" }],
    order: [["id", "ASC"]],
    transaction,
  });
  const systems = new Map((await System.findAll({ where: { familyId: families.map((f) => f.id) }, transaction })).map((s) => [s.id, s.kind]));
  const pins = await Pin.findAll({
    where: { connectorId: connectors.map((c) => c.id) },
    order: [
      ["connectorId", "ASC"],
      ["position", "ASC"],
    ],
    transaction,
  });
  const input = new Map(
    families.map((f) => [
      f.id,
      {
        slug: f.slug,
        name: f.name,
        modelRange: f.modelRange,
        yearFrom: f.yearFrom,
        yearTo: f.yearTo,
        engine: f.engine,
        ignition: f.ignition,
        make: { slug: f.make!.slug, name: f.make!.name },
      } satisfies FamilyInput,
    ]),
  );
  const docs: SearchDoc[] = [];
  for (const f of families) if (whole || scope.familyIds?.includes(f.id)) docs.push(familyDoc(input.get(f.id)!));
  for (const c of connectors) {
    const f = families.find((x) => x.id === c.familyId)!;
    docs.push(
      ...connectorDocs(
        input.get(f.id)!,
        {
          slug: c.slug,
          name: c.name,
          location: c.location,
          housing: c.housing,
          system: systems.get(c.systemId) ?? "",
          revision: c.revision,
          pins: pins
            .filter((p) => p.connectorId === c.id)
            .map((p) => ({ cavity: p.cavity, code: p.colourCode, circuit: p.circuit, terminal: p.terminal, goesTo: null })),
        },
        f.colourSystem as ColourSystemId,
      ),
    );
  }
  return docs;
}

const bodyOf = (d: SearchDoc) =>
  [d.codes.join(" "), d.terminals.join(" "), d.circuits.join(" "), d.family, d.colours.join(" "), d.make, d.subtitle, d.text, d.years.join(" ")].join(" \n ");

/**
 * Rows of the fallback index go in pairs: the full-text row in `search_fts` and its facet columns in `search_facets`
 * under the same rowid (db/migrations/2026-12-01-05-search-prefix.ts). Deleting: the facet rows first, found through
 * the full-text rows they pair with.
 */
async function deleteFallbackRows(where: string, replacements: unknown[], transaction?: Transaction) {
  await sequelize.query(`DELETE FROM search_facets WHERE rid IN (SELECT rowid FROM search_fts WHERE ${where})`, { replacements, transaction });
  await sequelize.query(`DELETE FROM search_fts WHERE ${where}`, { replacements, transaction });
}

/** Replace these documents in the fallback index (and, for a card, drop its pins that are gone). Same transaction as the change. */
export async function writeFallbackDocs(docs: SearchDoc[], transaction?: Transaction): Promise<void> {
  // the pairing below reads last_insert_rowid(), which belongs to one connection: always inside a transaction
  if (!transaction) return sequelize.transaction((t) => writeFallbackDocs(docs, t));
  const slugs = [...new Set(docs.filter((d) => d.type !== "family").map((d) => d.slug))];
  const ids = docs.map((d) => d.id);
  // In slices, like the ids: one IN list per call of every slug broke past SQLite's 32 766 bound parameters
  // (SQLITE_MAX_VARIABLE_NUMBER, sqlite.org/limits.html) — "too many SQL variables" on a library that large.
  for (let i = 0; i < slugs.length; i += 400) {
    const part = slugs.slice(i, i + 400);
    await deleteFallbackRows(`type IN ('connector', 'pin') AND slug IN (${part.map(() => "?").join(",")})`, part, transaction);
  }
  for (let i = 0; i < ids.length; i += 400) {
    const part = ids.slice(i, i + 400);
    await deleteFallbackRows(`id IN (${part.map(() => "?").join(",")})`, part, transaction);
  }
  for (const d of docs) {
    // the facet row takes the next rowid; the full-text row takes the same one (an FTS5 insert cannot RETURN it)
    await sequelize.query("INSERT INTO search_facets (type, make_slug, family_slug, system, pin_count) VALUES (?, ?, ?, ?, ?)", {
      replacements: [d.type, d.makeSlug, d.familySlug, d.system, d.pinCount],
      transaction,
    });
    await sequelize.query(
      "INSERT INTO search_fts (rowid, id, type, slug, make_slug, family_slug, system, pin_count, version, doc, title, body) VALUES (last_insert_rowid(), ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
      { replacements: [d.id, d.type, d.slug, d.makeSlug, d.familySlug, d.system, d.pinCount, d.version, JSON.stringify(d), d.title, bodyOf(d)], transaction },
    );
  }
}

/** Rebuild the whole fallback index from the published library, in one transaction. Returns the number of documents. */
export async function rebuildFallbackIndex(): Promise<number> {
  return sequelize.transaction(async (transaction) => {
    const docs = await libraryDocs(null, transaction);
    await sequelize.query("DELETE FROM search_facets", { transaction });
    await sequelize.query("DELETE FROM search_fts", { transaction });
    await writeFallbackDocs(docs, transaction);
    return docs.length;
  });
}

/** How many documents the fallback index holds. */
export async function fallbackCount(): Promise<number> {
  const [row] = await sequelize.query<{ n: number }>("SELECT COUNT(*) AS n FROM search_fts", { type: QueryTypes.SELECT });
  return row?.n ?? 0;
}
