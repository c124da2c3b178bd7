/**
 * The public API's bodies (../shared/API.md), built field by field from what the services read for the pages. Each
 * mapper names what it sends, so a field added for a page (an id, the face painting) never leaks into the API unseen;
 * the API tests hold the bodies to strict schemas (tests/integration/api-shapes.test.ts).
 */
import type { ConnectorCard, FamilySummary, PinRow, getFamily } from "./library.server";
import type { SearchHit } from "./search.server";

type FamilyDetail = NonNullable<Awaited<ReturnType<typeof getFamily>>>["family"];

export function toApiFamilySummary(f: FamilySummary) {
  return {
    slug: f.slug,
    name: f.name,
    make: { slug: f.make.slug, name: f.make.name },
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
    houseStyle: f.houseStyle,
  };
}

/** GET /api/v1/families/:slug: the family, its systems and, in each, its connectors (slug, name, pinCount, location …). */
export function toApiFamily(f: FamilyDetail) {
  return {
    ...toApiFamilySummary(f),
    blurb: f.blurb,
    systems: f.systems.map((s) => ({
      kind: s.kind,
      name: s.name,
      connectors: s.connectors.map((c) => ({ slug: c.slug, name: c.name, pinCount: c.pinCount, location: c.location, gender: c.gender, housing: c.housing })),
    })),
  };
}

function toApiPin(p: PinRow) {
  return {
    cavity: p.cavity,
    colour: { code: p.colour.code, base: p.colour.base, tracers: [...p.colour.tracers], iec: p.colour.iec, description: p.colour.description },
    circuit: p.circuit,
    terminal: p.terminal,
    goesTo: p.goesTo ? { connector: p.goesTo.connector, cavity: p.goesTo.cavity } : null,
    destinations: p.destinations.map((d) => ({ label: d.label, connector: d.connector, cavity: d.cavity })),
  };
}

/** GET /api/v1/connectors/:slug: a published card. */
export function toApiConnector(c: ConnectorCard) {
  return {
    slug: c.slug,
    name: c.name,
    family: {
      slug: c.family.slug,
      name: c.family.name,
      make: { slug: c.family.make.slug, name: c.family.make.name },
      yearFrom: c.family.yearFrom,
      yearTo: c.family.yearTo,
    },
    system: c.system,
    systemName: c.systemName,
    location: c.location,
    gender: c.gender,
    housing: c.housing,
    matesWith: c.matesWith,
    mateName: c.mateName,
    component: c.component ? { name: c.component.name, kind: c.component.kind } : null,
    colourSystem: c.colourSystem,
    houseStyle: c.houseStyle,
    layout: c.layout,
    pins: c.pins.map(toApiPin),
    specs: c.specs.map((s) => ({
      name: s.name,
      min: s.min,
      max: s.max,
      unit: s.unit,
      between: s.between,
      atC: s.atC,
      source: s.source,
      conditions: s.conditions,
      kind: s.kind,
      material: s.material,
    })),
    photos: c.photos.map((p) => ({
      url: p.url,
      thumbUrl: p.thumbUrl,
      width: p.width,
      height: p.height,
      thumbWidth: p.thumbWidth,
      thumbHeight: p.thumbHeight,
      caption: p.caption,
      credit: p.credit,
      licence: p.licence,
    })),
    revisions: c.revisions.map((r) => ({ number: r.number, summary: r.summary, publishedAt: r.publishedAt })),
    notes: c.notes,
    revision: { number: c.revision.number, publishedAt: c.revision.publishedAt },
    bikeChecked: c.bikeChecked,
    bikeCheckedYears: c.bikeCheckedYears,
  };
}

/** One hit of GET /api/v1/search. */
export function toApiSearchHit(h: SearchHit) {
  return { type: h.type, slug: h.slug, cavity: h.cavity, title: h.title, subtitle: h.subtitle, url: h.url, family: h.family, make: h.make };
}
