import type { QueryInterface } from "sequelize";

/**
 * The fallback index, made quick for what riders type first: one or two characters.
 *
 * - `search_fts` again, now with FTS5 prefix indexes for 1- and 2-character prefixes (sqlite.org/fts5.html, "Prefix
 *   Indexes"), so "b"* reads one prefix list instead of every term that starts with b.
 * - `search_facets`: the facet columns of each row (same rowid), in a narrow table of its own. Counting the facets of
 *   10 000 matches read the FTS content rows, each holding the whole document; the narrow rows sit many to a page.
 *
 * The table is left empty: db/setup.ts refills an empty fallback index from the published library at start.
 */
export async function up({ context: q }: { context: QueryInterface }) {
  await q.sequelize.query("DROP TABLE search_fts");
  await q.sequelize.query(`CREATE VIRTUAL TABLE search_fts USING fts5(
    id UNINDEXED, type UNINDEXED, slug UNINDEXED, make_slug UNINDEXED, family_slug UNINDEXED, system UNINDEXED,
    pin_count UNINDEXED, version UNINDEXED, doc UNINDEXED, title, body,
    tokenize = "unicode61 tokenchars '/+'",
    prefix = '1 2'
  )`);
  await q.sequelize.query(`CREATE TABLE search_facets (
    rid INTEGER PRIMARY KEY,
    type TEXT NOT NULL,
    make_slug TEXT NOT NULL,
    family_slug TEXT NOT NULL,
    system TEXT,
    pin_count INTEGER
  )`);
}

export async function down({ context: q }: { context: QueryInterface }) {
  await q.sequelize.query("DROP TABLE search_facets");
  await q.sequelize.query("DROP TABLE search_fts");
  await q.sequelize.query(`CREATE VIRTUAL TABLE search_fts USING fts5(
    id UNINDEXED, type UNINDEXED, slug UNINDEXED, make_slug UNINDEXED, family_slug UNINDEXED, system UNINDEXED,
    pin_count UNINDEXED, version UNINDEXED, doc UNINDEXED, title, body,
    tokenize = "unicode61 tokenchars '/+'"
  )`);
}
