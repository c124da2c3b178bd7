/** A submission's family context (notation, house style, the cards a wire can go to) and what keeps it from review. */
import type { Transaction } from "sequelize";
import { Connector, Family, Make, type Submission } from "~db/models/index.ts";
import { connectorSnapshot, type ConnectorSnapshot } from "~db/snapshot.ts";
import { houseFor, type ColourSystemId } from "~/domain/colours";
import { blankProposal, proposalProblems, type CardProposal, type Problem } from "~/domain/submissions";
import { proposalSchema, type FamilyRequest } from "~/validation/submissions";

/** A family's notation (with its make's house style) and the cards a wire can go to (slug, name, cavities). */
export async function familyContext(familyId: number | null, familyRequest: FamilyRequest | null, transaction?: Transaction) {
  if (familyId) {
    const family = await Family.findByPk(familyId, { include: [{ model: Make, as: "make" }], transaction, rejectOnEmpty: true });
    // Only what the editor needs of each card (a family has dozens; whole rows cost a millisecond more per view).
    const connectors = await Connector.findAll({ where: { familyId }, attributes: ["slug", "name", "cavities"], order: [["name", "ASC"]], transaction });
    return {
      family: { slug: family.slug, name: family.name, make: { slug: family.make!.slug, name: family.make!.name } },
      colourSystem: family.colourSystem as ColourSystemId,
      houseStyle: houseFor(family.colourSystem, family.make!.houseStyle),
      cards: connectors.map((c) => ({ slug: c.slug, name: c.name, cavities: c.cavities.map((x) => x.cavity) })),
    };
  }
  const make = familyRequest ? await Make.findOne({ where: { slug: familyRequest.make }, transaction }) : null;
  return {
    family: null,
    colourSystem: (make?.colourSystem ?? "en") as ColourSystemId,
    houseStyle: make ? houseFor(make.colourSystem, make.houseStyle) : null,
    cards: [] as { slug: string; name: string; cavities: string[] }[],
  };
}

export function proposalOf(s: Submission): CardProposal {
  const parsed = proposalSchema.safeParse(s.content);
  return parsed.success ? parsed.data : ({ ...blankProposal(), ...(s.content as object) } as CardProposal);
}

export function snapshotToProposal(snap: ConnectorSnapshot): CardProposal {
  const { slug: _slug, ...rest } = snap;
  return rest as CardProposal;
}

/**
 * Everything that keeps this submission from review: the proposal's problems, how the contributor knows, photos, and
 * the conditions of every spec it adds or changes against the published card (`before`, read here when not given).
 */
export async function submissionProblems(
  s: Submission,
  transaction?: Transaction,
  known?: Awaited<ReturnType<typeof familyContext>>,
  before?: CardProposal | null,
): Promise<Problem[]> {
  const ctx = known ?? (await familyContext(s.familyId, (s.familyRequest as FamilyRequest | null) ?? null, transaction));
  const parsed = proposalSchema.safeParse(s.content);
  if (!parsed.success) return parsed.error.issues.map((i) => ({ field: i.path.map(String).join("."), message: i.message }));
  const cards = new Map(ctx.cards.map((c) => [c.slug, c.cavities]));
  const published =
    before !== undefined ? before : s.kind === "edit" && s.connectorId ? snapshotToProposal(await connectorSnapshot(s.connectorId, transaction)) : null;
  return proposalProblems(parsed.data, ctx.colourSystem, cards, {
    requireSource: { kind: s.sourceKind, detail: s.sourceDetail },
    specsBefore: published?.specs ?? [],
    houseStyle: ctx.houseStyle,
  });
}
