import type { Transaction } from "sequelize";
import { sequelize } from "../index.server.ts";
import { Circuit, Component, ComponentLink, Connector, Family, Make, Pin, Revision, SpecValue, System, User, Wire } from "../models/index.ts";
import { hashPassword } from "../../app/infra/password-hash.server.ts";
import { buildFamily } from "./demo/build.ts";
import { demoMakes } from "./demo/makes.ts";
import { connectorSnapshot } from "../snapshot.ts";

const SYSTEM_NAMES: Record<string, string> = {
  ignition: "Ignition",
  charging: "Charging",
  starting: "Starting",
  lighting: "Lighting",
  signals: "Signals",
  instruments: "Instruments",
};
// A fixed date so the seeded revisions do not change between runs.
const PUBLISHED = new Date("2026-11-20T09:00:00Z");

/** Demo accounts, one per role: created only with the demo library (never with SEED_DEMO=false). Listed in the README. */
export const DEMO_ACCOUNTS = [
  { email: "rider@loomlore.invalid", displayName: "Demo Rider", role: "rider", password: "throttle-cable-42", verified: false },
  { email: "contributor@loomlore.invalid", displayName: "Demo Contributor", role: "contributor", password: "crimp-and-solder-7", verified: true },
  { email: "moderator@loomlore.invalid", displayName: "Demo Moderator", role: "moderator", password: "review-queue-lamp", verified: true },
  { email: "admin@loomlore.invalid", displayName: "Demo Admin", role: "admin", password: "spark-gap-0.6mm", verified: true },
] as const;

/** Insert the invented demo library in one transaction; the caller decides whether the database is empty. */
export async function seedDemo() {
  // Hash before the transaction: bcrypt takes a quarter of a second each and needs no lock.
  const hashes = await Promise.all(DEMO_ACCOUNTS.map((a) => hashPassword(a.password, undefined, { wait: true })));
  await sequelize.transaction(async (transaction) => {
    const now = new Date(PUBLISHED);
    for (const [i, a] of DEMO_ACCOUNTS.entries()) {
      await User.create(
        {
          email: a.email,
          displayName: a.displayName,
          role: a.role,
          passwordHash: hashes[i],
          emailVerifiedAt: a.verified ? now : null,
          passwordChangedAt: now,
          createdAt: now,
          disabledAt: null,
        },
        { transaction },
      );
    }
    for (const m of demoMakes) {
      const make = await Make.create({ slug: m.slug, name: m.name, colourSystem: m.colourSystem, houseStyle: m.houseStyle, blurb: m.blurb }, { transaction });
      for (const f of m.families) await seedFamily(make.id, m.colourSystem, f, transaction);
    }
  });
}

async function seedFamily(makeId: number, colourSystem: string, f: (typeof demoMakes)[number]["families"][number], transaction: Transaction) {
  const rows = buildFamily(f);
  const family = await Family.create(
    {
      makeId,
      slug: f.slug,
      name: f.name,
      modelRange: f.modelRange,
      yearFrom: f.yearFrom,
      yearTo: f.yearTo,
      engine: f.engine,
      displacementCc: f.displacementCc,
      cylinders: f.cylinders,
      firingOrder: f.firingOrder,
      crankDeg: f.crankDeg,
      ignition: f.ignition,
      colourSystem,
      systemVoltage: f.systemVoltage,
      earth: f.earth,
      blurb: f.blurb,
    },
    { transaction },
  );
  const systems = new Map<string, number>();
  for (const kind of f.systems) {
    const s = await System.create({ familyId: family.id, kind, name: SYSTEM_NAMES[kind] ?? kind }, { transaction });
    systems.set(kind, s.id);
  }
  const sys = (kind: string | null) => (kind ? (systems.get(kind) ?? null) : null);
  const components = new Map<string, number>();
  for (const c of rows.components) {
    const row = await Component.create(
      { familyId: family.id, systemId: sys(c.system), key: c.key, kind: c.kind, name: c.name, location: c.location },
      { transaction },
    );
    components.set(c.key, row.id);
  }
  const connectors = new Map<string, number>();
  for (const c of rows.connectors) {
    const row = await Connector.create(
      {
        familyId: family.id,
        systemId: sys(c.system)!,
        componentId: c.owner ? components.get(c.owner)! : null,
        slug: c.slug,
        name: c.name,
        location: c.location,
        gender: c.gender,
        housing: c.housing,
        matesWithId: null,
        rows: c.rows,
        cols: c.cols,
        cavities: c.cavities,
        pin1: c.pin1,
        latch: c.latch,
        notes: c.notes,
        revision: 1,
        publishedAt: PUBLISHED,
      },
      { transaction },
    );
    connectors.set(c.slug, row.id);
  }
  for (const c of rows.connectors) {
    await Connector.update({ matesWithId: connectors.get(c.matesWith)! }, { where: { id: connectors.get(c.slug)! }, transaction });
  }
  const pins = new Map<string, number>();
  for (const p of rows.pins) {
    const row = await Pin.create(
      {
        familyId: family.id,
        connectorId: p.connector ? connectors.get(p.connector)! : null,
        componentId: p.component ? components.get(p.component)! : null,
        cavity: p.cavity,
        colourCode: p.code,
        circuit: p.circuit,
        terminal: p.terminal,
        position: p.position,
        fitting: p.fitting ?? null,
      },
      { transaction },
    );
    pins.set(p.ref, row.id);
  }
  for (const w of rows.wires) {
    await Wire.create(
      { familyId: family.id, fromPinId: pins.get(w.from)!, toPinId: pins.get(w.to)!, colourCode: w.code, sizeMm2: w.sizeMm2, lengthMm: w.lengthMm },
      { transaction },
    );
  }
  for (const l of rows.links) {
    await ComponentLink.create(
      {
        componentId: components.get(l.component)!,
        fromPinId: pins.get(l.from)!,
        toPinId: pins.get(l.to)!,
        kind: l.kind,
        label: l.label,
        switchId: l.switchId,
        positions: l.positions,
        ratingA: l.ratingA,
        params: l.params,
      },
      { transaction },
    );
  }
  for (const c of rows.circuits) {
    await Circuit.create(
      {
        familyId: family.id,
        systemId: sys(c.system)!,
        slug: c.slug,
        name: c.name,
        fromPinId: pins.get(c.from)!,
        toPinId: pins.get(c.to)!,
        via: c.via,
        switches: c.switches,
      },
      { transaction },
    );
  }
  for (const s of rows.specs) {
    await SpecValue.create(
      {
        connectorId: connectors.get(s.connector)!,
        name: s.name,
        min: s.min,
        max: s.max,
        unit: s.unit,
        betweenA: s.betweenA,
        betweenB: s.betweenB,
        atC: s.atC,
        source: s.source,
        conditions: s.conditions,
        kind: s.kind,
        material: s.material,
      },
      { transaction },
    );
  }
  for (const [, id] of connectors) {
    await Revision.create(
      { connectorId: id, number: 1, snapshot: await connectorSnapshot(id, transaction), summary: "First published card (demo data).", publishedAt: PUBLISHED },
      { transaction },
    );
  }
}
