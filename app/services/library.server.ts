/** Reads of the published library: makes, families, connector cards, face geometry, CSV. */
import { Op } from "sequelize";
import { Component, Connector, Family, Make, Photo, Pin, Revision, SpecValue, System, Wire } from "~db/models/index.ts";
import { decodeColour, describeColour, houseFor, type ColourSystemId, type HouseStyleId } from "~/domain/colours";
import { facePaint, type CavityPaint } from "~/domain/face-paint";
import { faceGeometry, type FaceHalf, type FaceSide, type HousingLayout } from "~/domain/connector-face";
import { bikeChecks } from "./garage.server";
import { photoUrls } from "./photos.server";
import { isSlug } from "~/validation/library";

export interface MakeSummary {
  slug: string;
  name: string;
  colourSystem: string;
  houseStyle: string;
  familyCount: number;
  blurb: string;
}
export interface FamilySummary {
  slug: string;
  name: string;
  make: { slug: string; name: string };
  yearFrom: number;
  yearTo: number;
  engine: string;
  cylinders: number;
  firingOrder: string;
  ignition: string;
  displacementCc: number;
  modelRange: string;
  colourSystem: string;
  crankDeg: number | null;
  systemVoltage: number;
  earth: "negative" | "positive";
  /** The make's house style, when it belongs to the family's notation (API.md additions); null for the notation's usual reading. */
  houseStyle: HouseStyleId | null;
}

function familySummary(f: Family & { make?: Make }): FamilySummary {
  return {
    slug: f.slug,
    name: f.name,
    make: { slug: f.make!.slug, name: f.make!.name },
    yearFrom: f.yearFrom,
    yearTo: f.yearTo,
    engine: f.engine,
    cylinders: f.cylinders,
    firingOrder: f.firingOrder,
    ignition: f.ignition,
    displacementCc: f.displacementCc,
    modelRange: f.modelRange,
    colourSystem: f.colourSystem,
    crankDeg: f.crankDeg,
    systemVoltage: f.systemVoltage,
    earth: f.earth,
    houseStyle: houseFor(f.colourSystem, f.make!.houseStyle),
  };
}

/** Every make with its number of families, by name. */
export async function listMakes(): Promise<MakeSummary[]> {
  const makes = await Make.findAll({ order: [["name", "ASC"]] });
  const counts = await Family.count({ group: ["make_id"] });
  const byMake = new Map((counts as unknown as { make_id: number; count: number }[]).map((c) => [c.make_id, c.count]));
  return makes.map((m) => ({
    slug: m.slug,
    name: m.name,
    colourSystem: m.colourSystem,
    houseStyle: m.houseStyle,
    familyCount: byMake.get(m.id) ?? 0,
    blurb: m.blurb,
  }));
}

/** One make and its families, or null. */
export async function getMake(slug: string) {
  if (!isSlug(slug)) return null;
  const make = await Make.findOne({ where: { slug } });
  if (!make) return null;
  const families = await Family.findAll({
    where: { makeId: make.id },
    include: [{ model: Make, as: "make" }],
    order: [
      ["yearFrom", "ASC"],
      ["name", "ASC"],
    ],
  });
  return {
    make: { slug: make.slug, name: make.name, colourSystem: make.colourSystem, houseStyle: make.houseStyle, blurb: make.blurb },
    families: families.map(familySummary),
  };
}

/** Families, optionally of one make and/or covering one model year. */
export async function listFamilies(q: { make?: string; year?: number; limit: number; offset: number }) {
  const where: Record<string | symbol, unknown> = {};
  if (q.year !== undefined) Object.assign(where, { yearFrom: { [Op.lte]: q.year }, yearTo: { [Op.gte]: q.year } });
  const include = [{ model: Make, as: "make", ...(q.make ? { where: { slug: q.make } } : {}) }];
  const { rows, count } = await Family.findAndCountAll({ where, include, order: [["name", "ASC"]], limit: q.limit, offset: q.offset });
  return { families: rows.map(familySummary), total: count };
}

export interface ConnectorSummary {
  slug: string;
  name: string;
  pinCount: number;
  location: string;
  gender: string;
  housing: string;
  side: "component" | "loom";
  layout: HousingLayout;
  paint: FacePaint[];
}
export type FacePaint = CavityPaint;

function layoutOf(c: Connector): HousingLayout {
  return { rows: c.rows, cols: c.cols, cavities: c.cavities, pin1: c.pin1, latch: c.latch };
}

/** The card's face paint (one rule for every face view: app/domain/face-paint.ts). */
const paintFor = (pins: Pin[], system: ColourSystemId, houseStyle: HouseStyleId | null): FacePaint[] =>
  facePaint(
    pins.map((p) => ({ cavity: p.cavity, code: p.colourCode })),
    system,
    houseStyle,
  );

/** A family with its systems and their connectors (thumbnails included), or null. */
export async function getFamily(slug: string) {
  if (!isSlug(slug)) return null;
  const family = await Family.findOne({ where: { slug }, include: [{ model: Make, as: "make" }] });
  if (!family) return null;
  const systems = await System.findAll({ where: { familyId: family.id }, order: [["id", "ASC"]] });
  const connectors = await Connector.findAll({ where: { familyId: family.id }, order: [["id", "ASC"]] });
  const pins = await Pin.findAll({ where: { connectorId: connectors.map((c) => c.id) }, order: [["position", "ASC"]] });
  const system = family.colourSystem as ColourSystemId;
  const house = houseFor(family.colourSystem, family.make!.houseStyle);
  const summary = (c: Connector): ConnectorSummary => {
    const own = pins.filter((p) => p.connectorId === c.id);
    return {
      slug: c.slug,
      name: c.name,
      pinCount: own.length,
      location: c.location,
      gender: c.gender,
      housing: c.housing,
      side: c.componentId ? "component" : "loom",
      layout: layoutOf(c),
      paint: paintFor(own, system, house),
    };
  };
  return {
    family: {
      ...familySummary(family),
      blurb: family.blurb,
      systems: systems.map((s) => ({ kind: s.kind, name: s.name, connectors: connectors.filter((c) => c.systemId === s.id).map(summary) })),
    },
  };
}

export interface PinRow {
  cavity: string;
  colour: { code: string | null; base: string | null; tracers: string[]; iec: string | null; description: string };
  circuit: string;
  terminal: string | null;
  goesTo: { connector: string; cavity: string } | null;
  destinations: { label: string; connector: string | null; cavity: string | null }[];
}

/** The published connector card in the API's shape (plus display extras), or null. */
export async function getConnectorCard(slug: string) {
  if (!isSlug(slug)) return null;
  const c = await Connector.findOne({ where: { slug } });
  if (!c) return null;
  const [family, system, mate, owner, pins, specs, photos, revisions] = await Promise.all([
    Family.findByPk(c.familyId, { include: [{ model: Make, as: "make" }], rejectOnEmpty: true }),
    System.findByPk(c.systemId, { rejectOnEmpty: true }),
    c.matesWithId ? Connector.findByPk(c.matesWithId) : null,
    c.componentId ? Component.findByPk(c.componentId) : null,
    Pin.findAll({ where: { connectorId: c.id }, order: [["position", "ASC"]] }),
    SpecValue.findAll({ where: { connectorId: c.id }, order: [["id", "ASC"]] }),
    Photo.findAll({ where: { connectorId: c.id, removedAt: null }, order: [["position", "ASC"]] }),
    Revision.findAll({ where: { connectorId: c.id }, attributes: ["number", "summary", "publishedAt"], order: [["number", "DESC"]] }),
  ]);
  const colourSystem = family.colourSystem as ColourSystemId;
  const houseStyle = houseFor(family.colourSystem, family.make!.houseStyle);
  const [destinations, checks] = await Promise.all([wireDestinations(pins), bikeChecks(c.id)]);
  const pinRows: PinRow[] = pins.map((p) => {
    const d = p.colourCode ? decodeColour(p.colourCode, colourSystem, { houseStyle }) : null;
    const dest = owner
      ? [{ label: `into the ${owner.name.replace(/^./, (ch) => ch.toLowerCase())}`, connector: null, cavity: null }]
      : (destinations.get(p.id) ?? []);
    const first = dest.find((x) => x.connector);
    return {
      cavity: p.cavity,
      colour: d?.ok
        ? {
            code: p.colourCode,
            base: d.value.base?.name ?? d.value.colours[0] ?? null,
            tracers: d.value.tracers.map((t) => t.name),
            iec: d.value.iec,
            description: describeColour(d.value),
          }
        : { code: p.colourCode, base: null, tracers: [], iec: null, description: p.colourCode ? "not understood in this family's notation" : "no wire" },
      circuit: p.circuit,
      terminal: p.terminal,
      goesTo: first ? { connector: first.connector!, cavity: first.cavity! } : null,
      destinations: dest,
    };
  });
  return {
    connector: {
      slug: c.slug,
      name: c.name,
      family: {
        slug: family.slug,
        name: family.name,
        make: { slug: family.make!.slug, name: family.make!.name },
        yearFrom: family.yearFrom,
        yearTo: family.yearTo,
      },
      system: system.kind,
      systemName: system.name,
      location: c.location,
      gender: c.gender,
      housing: c.housing,
      matesWith: mate?.slug ?? null,
      mateName: mate?.name ?? null,
      component: owner ? { name: owner.name, kind: owner.kind } : null,
      colourSystem,
      houseStyle,
      layout: layoutOf(c),
      pins: pinRows,
      specs: specs.map((s) => ({
        name: s.name,
        min: s.min,
        max: s.max,
        unit: s.unit,
        between: [s.betweenA, s.betweenB] as [string, string],
        atC: s.atC,
        source: s.source,
        conditions: s.conditions,
        kind: s.kind,
        material: s.material,
      })),
      photos: photos.map((p) => ({
        ...photoUrls(p.id),
        width: p.width,
        height: p.height,
        thumbWidth: p.thumbWidth,
        thumbHeight: p.thumbHeight,
        caption: p.caption,
        credit: p.credit,
        licence: p.licence,
      })),
      revisions: revisions.map((r) => ({ number: r.number, summary: r.summary, publishedAt: r.publishedAt.toISOString() })),
      notes: c.notes,
      revision: { number: c.revision, publishedAt: c.publishedAt.toISOString() },
      bikeChecked: checks.count,
      bikeCheckedYears: checks.years,
      id: c.id,
      paint: paintFor(pins, colourSystem, houseStyle),
    },
  };
}
export type ConnectorCard = NonNullable<Awaited<ReturnType<typeof getConnectorCard>>>["connector"];

/** For loom-side pins: where each wire ends, looking through splices to the pins beyond them. */
async function wireDestinations(pins: Pin[]) {
  const out = new Map<number, PinRow["destinations"]>();
  if (pins.length === 0) return out;
  const ids = pins.map((p) => p.id);
  const wires = await Wire.findAll({ where: { [Op.or]: [{ fromPinId: ids }, { toPinId: ids }] } });
  const farIds = wires.map((w) => (ids.includes(w.fromPinId) ? w.toPinId : w.fromPinId));
  const far = await Pin.findAll({ where: { id: farIds } });
  const farComponents = await Component.findAll({ where: { id: far.map((p) => p.componentId).filter((x): x is number => !!x) } });
  const splices = far.filter((p) => farComponents.find((c) => c.id === p.componentId)?.kind === "splice");
  const spliceIds = new Set(splices.map((s) => s.id));
  const spliceWires = splices.length
    ? await Wire.findAll({ where: { [Op.or]: [{ fromPinId: splices.map((s) => s.id) }, { toPinId: splices.map((s) => s.id) }] } })
    : [];
  const beyondIds = spliceWires.flatMap((w) => [w.fromPinId, w.toPinId]);
  const beyond = await Pin.findAll({ where: { id: beyondIds } });
  const allPins = new Map([...far, ...beyond].map((p) => [p.id, p]));
  const comps = await Component.findAll({ where: { id: [...allPins.values()].map((p) => p.componentId).filter((x): x is number => !!x) } });
  const conns = await Connector.findAll({ where: { id: [...allPins.values()].map((p) => p.connectorId).filter((x): x is number => !!x) } });
  const describe = (p: Pin) => {
    if (p.connectorId) {
      const cn = conns.find((x) => x.id === p.connectorId)!;
      return { label: `${cn.name}, cavity ${p.cavity}`, connector: cn.slug, cavity: p.cavity };
    }
    const comp = comps.find((x) => x.id === p.componentId);
    return { label: `${comp?.name ?? "component"}, terminal ${p.cavity}`, connector: null, cavity: null };
  };
  for (const p of pins) {
    const list: PinRow["destinations"] = [];
    for (const w of wires.filter((x) => x.fromPinId === p.id || x.toPinId === p.id)) {
      const other = allPins.get(w.fromPinId === p.id ? w.toPinId : w.fromPinId)!;
      if (spliceIds.has(other.id)) {
        for (const sw of spliceWires.filter((x) => x.fromPinId === other.id || x.toPinId === other.id)) {
          const b = allPins.get(sw.fromPinId === other.id ? sw.toPinId : sw.fromPinId)!;
          if (b.id !== p.id) list.push({ ...describe(b), label: `via a splice: ${describe(b).label}` });
        }
      } else list.push(describe(other));
    }
    out.set(p.id, list);
  }
  return out;
}

/** Just a connector's housing layout and revision (what the face route needs), or null. */
export async function getConnectorLayout(slug: string): Promise<{ slug: string; revision: number; layout: HousingLayout } | null> {
  if (!isSlug(slug)) return null;
  const c = await Connector.findOne({ where: { slug } });
  return c ? { slug: c.slug, revision: c.revision, layout: layoutOf(c) } : null;
}

/** Face geometry for a connector, in the API's shape. */
export function cardFace(card: { layout: HousingLayout }, view: FaceSide, half: FaceHalf) {
  const g = faceGeometry(card.layout, { view, half });
  return { view: g.view, half: g.half, width: g.width, height: g.height, pitch: g.pitch, cavities: g.cavities, pin1: g.pin1, latch: g.latch };
}

const csvCell = (v: unknown) => {
  const s = v == null ? "" : String(v);
  // Quote when needed; a leading =, +, - or @ is defused so a spreadsheet does not run it as a formula.
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
  return /[",\n\r]/.test(safe) ? `"${safe.replaceAll('"', '""')}"` : safe;
};

/** The pin map as CSV with a header row. */
export function cardCsv(card: ConnectorCard): string {
  const head = ["cavity", "colour_code", "base", "tracers", "iec", "circuit", "terminal", "goes_to_connector", "goes_to_cavity", "goes_to"];
  const rows = card.pins.map((p) => [
    p.cavity,
    p.colour.code,
    p.colour.base,
    p.colour.tracers.join(" "),
    p.colour.iec,
    p.circuit,
    p.terminal,
    p.goesTo?.connector,
    p.goesTo?.cavity,
    p.destinations.map((d) => d.label).join("; "),
  ]);
  return [head, ...rows].map((r) => r.map(csvCell).join(",")).join("\r\n") + "\r\n";
}

/** Every card's slug and name, grouped by family (for the contributor's "edit a card" picker). */
export async function cardsByFamily() {
  const families = await Family.findAll({ include: [{ model: Make, as: "make" }], order: [["name", "ASC"]] });
  const connectors = await Connector.findAll({ attributes: ["slug", "name", "familyId"], order: [["name", "ASC"]] });
  return families.map((f) => ({
    family: { slug: f.slug, name: f.name, make: f.make!.name },
    cards: connectors.filter((c) => c.familyId === f.id).map((c) => ({ slug: c.slug, name: c.name })),
  }));
}
