import { Op } from "sequelize";
import { Family } from "~db/models/index.ts";
import { ensureDatabase } from "./database.server";

/** Resolve what a rider typed in the quick-jump box to one family slug: exact slug, exact name, or a single name match. */
export async function resolveFamily(typed: string): Promise<string | null> {
  await ensureDatabase();
  const t = typed.trim();
  if (!t) return null;
  const exact = await Family.findOne({ where: { [Op.or]: [{ slug: t.toLowerCase() }, { name: t }] } });
  if (exact) return exact.slug;
  const like = await Family.findAll({ where: { name: { [Op.like]: `%${t.replace(/[%_]/g, "")}%` } }, limit: 2 });
  return like.length === 1 ? like[0].slug : null;
}
