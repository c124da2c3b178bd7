import { Op } from "sequelize";
import { Family } from "~db/models/index.ts";

/** Resolve what a rider typed in the quick-jump box to one family slug: exact slug, exact name, or a single name match. */
export async function resolveFamily(typed: string): Promise<string | null> {
  // Control characters (a NUL above all) never reach a query: Sequelize's SQLite dialect inlines string values.
  const t = typed
    // eslint-disable-next-line no-control-regex
    .replace(/[\u0000-\u001f\u007f]/g, "")
    .trim()
    .slice(0, 120);
  if (!t) return null;
  const exact = await Family.findOne({ where: { [Op.or]: [{ slug: t.toLowerCase() }, { name: t }] } });
  if (exact) return exact.slug;
  const like = await Family.findAll({ where: { name: { [Op.like]: `%${t.replace(/[%_]/g, "")}%` } }, limit: 2 });
  return like.length === 1 ? like[0].slug : null;
}
