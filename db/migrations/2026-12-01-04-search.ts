import type { QueryInterface } from "sequelize";

/**
 * The database's own full-text index of the library (SQLite FTS5): what /api/v1/search answers from when the search
 * service is down, slow or failing. Written in the same transaction as every publish, so it never drifts. Codes keep
 * their slash and plus ("W/R", "ws/rt", "B+") as one token.
 */
export async function up({ context: q }: { context: QueryInterface }) {
  await q.sequelize.query(`CREATE VIRTUAL TABLE search_fts USING fts5(
    id UNINDEXED, type UNINDEXED, slug UNINDEXED, make_slug UNINDEXED, family_slug UNINDEXED, system UNINDEXED,
    pin_count UNINDEXED, version UNINDEXED, doc UNINDEXED, title, body,
    tokenize = "unicode61 tokenchars '/+'"
  )`);
}

export async function down({ context: q }: { context: QueryInterface }) {
  await q.sequelize.query("DROP TABLE search_fts");
}
