import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute } from "sequelize";
import type { LinkParams } from "../../app/domain/electrics.ts";
import { sequelize } from "../index.server.ts";

const common = { sequelize, underscored: true } as const;
const json = (field: string) => ({
  type: DataTypes.TEXT,
  allowNull: false,
  get(this: Model) {
    const raw = this.getDataValue(field as never) as unknown as string | null;
    return raw == null ? null : JSON.parse(raw);
  },
  set(this: Model, value: unknown) {
    this.setDataValue(field as never, JSON.stringify(value) as never);
  },
});

/** A maker of motorcycles; writes its diagrams' colours in one notation. */
export class Make extends Model<InferAttributes<Make>, InferCreationAttributes<Make>> {
  declare id: CreationOptional<number>;
  declare slug: string;
  declare name: string;
  declare colourSystem: string;
  /** How this make writes colours within its notation (app/domain/colours house styles); "" for the notation's usual reading. */
  declare houseStyle: CreationOptional<string>;
  declare blurb: string;
}
Make.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    slug: { type: DataTypes.STRING, allowNull: false, unique: true },
    name: { type: DataTypes.STRING, allowNull: false },
    colourSystem: { type: DataTypes.STRING, allowNull: false },
    houseStyle: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    blurb: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
  },
  { ...common, tableName: "makes", timestamps: false },
);

/** A model range sharing one loom design (years, engine, ignition). */
export class Family extends Model<InferAttributes<Family>, InferCreationAttributes<Family>> {
  declare id: CreationOptional<number>;
  declare makeId: ForeignKey<number>;
  declare slug: string;
  declare name: string;
  declare modelRange: string;
  declare yearFrom: number;
  declare yearTo: number;
  declare engine: string;
  declare displacementCc: number;
  declare cylinders: number;
  declare firingOrder: string;
  declare crankDeg: number | null;
  declare ignition: string;
  declare colourSystem: string;
  /** Nominal system voltage: 6 or 12. */
  declare systemVoltage: CreationOptional<number>;
  /** Which battery post is joined to the frame. */
  declare earth: CreationOptional<"negative" | "positive">;
  declare blurb: string;
  declare make?: NonAttribute<Make>;
}
Family.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    makeId: { type: DataTypes.INTEGER, allowNull: false },
    slug: { type: DataTypes.STRING, allowNull: false, unique: true },
    name: { type: DataTypes.STRING, allowNull: false },
    modelRange: { type: DataTypes.STRING, allowNull: false },
    yearFrom: { type: DataTypes.INTEGER, allowNull: false },
    yearTo: { type: DataTypes.INTEGER, allowNull: false },
    engine: { type: DataTypes.STRING, allowNull: false },
    displacementCc: { type: DataTypes.INTEGER, allowNull: false },
    cylinders: { type: DataTypes.INTEGER, allowNull: false },
    firingOrder: { type: DataTypes.STRING, allowNull: false },
    crankDeg: { type: DataTypes.INTEGER, allowNull: true },
    ignition: { type: DataTypes.STRING, allowNull: false },
    colourSystem: { type: DataTypes.STRING, allowNull: false },
    systemVoltage: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 12 },
    earth: { type: DataTypes.TEXT, allowNull: false, defaultValue: "negative" },
    blurb: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
  },
  { ...common, tableName: "families", timestamps: false },
);

/** One of a family's electrical systems (ignition, charging, starting, lighting, signals, instruments). */
export class System extends Model<InferAttributes<System>, InferCreationAttributes<System>> {
  declare id: CreationOptional<number>;
  declare familyId: ForeignKey<number>;
  declare kind: string;
  declare name: string;
}
System.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    familyId: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING, allowNull: false },
    name: { type: DataTypes.STRING, allowNull: false },
  },
  { ...common, tableName: "systems", timestamps: false },
);

/** A part of the loom graph that owns pins and declares its internal links (battery, switch, fuse, coil …). */
export class Component extends Model<InferAttributes<Component>, InferCreationAttributes<Component>> {
  declare id: CreationOptional<number>;
  declare familyId: ForeignKey<number>;
  declare systemId: ForeignKey<number> | null;
  declare key: string;
  declare kind: string;
  declare name: string;
  declare location: string;
}
Component.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    familyId: { type: DataTypes.INTEGER, allowNull: false },
    systemId: { type: DataTypes.INTEGER, allowNull: true },
    key: { type: DataTypes.STRING, allowNull: false },
    kind: { type: DataTypes.STRING, allowNull: false },
    name: { type: DataTypes.STRING, allowNull: false },
    location: { type: DataTypes.STRING, allowNull: false, defaultValue: "" },
  },
  { ...common, tableName: "components", timestamps: false },
);

/** A connector housing: the live (published) state of a connector card. */
export class Connector extends Model<InferAttributes<Connector>, InferCreationAttributes<Connector>> {
  declare id: CreationOptional<number>;
  declare familyId: ForeignKey<number>;
  declare systemId: ForeignKey<number>;
  declare componentId: ForeignKey<number> | null;
  declare slug: string;
  declare name: string;
  declare location: string;
  declare gender: "plug" | "socket";
  declare housing: string;
  declare matesWithId: ForeignKey<number> | null;
  declare rows: number;
  declare cols: number;
  declare cavities: { cavity: string; row: number; col: number }[];
  declare pin1: string;
  declare latch: "top" | "bottom" | "left" | "right";
  declare notes: string;
  declare revision: number;
  declare publishedAt: Date;
  declare family?: NonAttribute<Family>;
}
Connector.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    familyId: { type: DataTypes.INTEGER, allowNull: false },
    systemId: { type: DataTypes.INTEGER, allowNull: false },
    componentId: { type: DataTypes.INTEGER, allowNull: true },
    slug: { type: DataTypes.STRING, allowNull: false, unique: true },
    name: { type: DataTypes.STRING, allowNull: false },
    location: { type: DataTypes.STRING, allowNull: false },
    gender: { type: DataTypes.STRING, allowNull: false },
    housing: { type: DataTypes.STRING, allowNull: false },
    matesWithId: { type: DataTypes.INTEGER, allowNull: true },
    rows: { type: DataTypes.INTEGER, allowNull: false },
    cols: { type: DataTypes.INTEGER, allowNull: false },
    cavities: json("cavities"),
    pin1: { type: DataTypes.STRING, allowNull: false },
    latch: { type: DataTypes.STRING, allowNull: false },
    notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    revision: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    publishedAt: { type: DataTypes.DATE, allowNull: false },
  },
  { ...common, tableName: "connectors", timestamps: false },
);

/** A node of the loom graph: a connector cavity, or a bare terminal of a component (battery post, splice …). */
export class Pin extends Model<InferAttributes<Pin>, InferCreationAttributes<Pin>> {
  declare id: CreationOptional<number>;
  declare familyId: ForeignKey<number>;
  declare connectorId: ForeignKey<number> | null;
  declare componentId: ForeignKey<number> | null;
  declare cavity: string;
  declare colourCode: string | null;
  declare circuit: string;
  declare terminal: string | null;
  declare position: number;
  /** A bare terminal's fitting ("ring M6", "6.3 mm flat-blade", "4.7 mm bullet"); null for cavities (the housing says). */
  declare fitting: CreationOptional<string | null>;
}
Pin.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    familyId: { type: DataTypes.INTEGER, allowNull: false },
    connectorId: { type: DataTypes.INTEGER, allowNull: true },
    componentId: { type: DataTypes.INTEGER, allowNull: true },
    cavity: { type: DataTypes.STRING, allowNull: false },
    colourCode: { type: DataTypes.STRING, allowNull: true },
    circuit: { type: DataTypes.STRING, allowNull: false, defaultValue: "" },
    terminal: { type: DataTypes.STRING, allowNull: true },
    position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    fitting: { type: DataTypes.TEXT, allowNull: true },
  },
  { ...common, tableName: "pins", timestamps: false },
);

/** A wire joining two pins, with its colour as the maker writes it. */
export class Wire extends Model<InferAttributes<Wire>, InferCreationAttributes<Wire>> {
  declare id: CreationOptional<number>;
  declare familyId: ForeignKey<number>;
  declare fromPinId: ForeignKey<number>;
  declare toPinId: ForeignKey<number>;
  declare colourCode: string;
  declare sizeMm2: number | null;
  declare lengthMm: number | null;
}
Wire.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    familyId: { type: DataTypes.INTEGER, allowNull: false },
    fromPinId: { type: DataTypes.INTEGER, allowNull: false },
    toPinId: { type: DataTypes.INTEGER, allowNull: false },
    colourCode: { type: DataTypes.STRING, allowNull: false },
    sizeMm2: { type: DataTypes.REAL, allowNull: true },
    lengthMm: { type: DataTypes.INTEGER, allowNull: true },
  },
  { ...common, tableName: "wires", timestamps: false },
);

/** A path inside a component between two of its pins; `positions` limits it to given switch positions. */
export class ComponentLink extends Model<InferAttributes<ComponentLink>, InferCreationAttributes<ComponentLink>> {
  declare id: CreationOptional<number>;
  declare componentId: ForeignKey<number>;
  declare fromPinId: ForeignKey<number>;
  declare toPinId: ForeignKey<number>;
  declare kind: string;
  declare label: string;
  declare switchId: string | null;
  declare positions: string[] | null;
  declare ratingA: number | null;
  /** The link's electrical model (app/domain/electrics.ts LinkParams), or null for the kind's defaults. */
  declare params: CreationOptional<LinkParams | null>;
}
ComponentLink.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    componentId: { type: DataTypes.INTEGER, allowNull: false },
    fromPinId: { type: DataTypes.INTEGER, allowNull: false },
    toPinId: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING, allowNull: false },
    label: { type: DataTypes.STRING, allowNull: false },
    switchId: { type: DataTypes.STRING, allowNull: true },
    positions: { ...json("positions"), allowNull: true },
    ratingA: { type: DataTypes.REAL, allowNull: true },
    params: { ...json("params"), allowNull: true },
  },
  { ...common, tableName: "component_links", timestamps: false },
);

/** A named circuit of a family: from one pin to another through the given load links. */
export class Circuit extends Model<InferAttributes<Circuit>, InferCreationAttributes<Circuit>> {
  declare id: CreationOptional<number>;
  declare familyId: ForeignKey<number>;
  declare systemId: ForeignKey<number>;
  declare slug: string;
  declare name: string;
  declare fromPinId: ForeignKey<number>;
  declare toPinId: ForeignKey<number>;
  declare via: string[];
  declare switches: Record<string, string>;
}
Circuit.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    familyId: { type: DataTypes.INTEGER, allowNull: false },
    systemId: { type: DataTypes.INTEGER, allowNull: false },
    slug: { type: DataTypes.STRING, allowNull: false },
    name: { type: DataTypes.STRING, allowNull: false },
    fromPinId: { type: DataTypes.INTEGER, allowNull: false },
    toPinId: { type: DataTypes.INTEGER, allowNull: false },
    via: json("via"),
    switches: json("switches"),
  },
  { ...common, tableName: "circuits", timestamps: false },
);

/** A value to measure on a card, between two cavities. */
export class SpecValue extends Model<InferAttributes<SpecValue>, InferCreationAttributes<SpecValue>> {
  declare id: CreationOptional<number>;
  declare connectorId: ForeignKey<number>;
  declare name: string;
  declare min: number;
  /** null: no upper limit (an insulation test that must read open). */
  declare max: number | null;
  declare unit: string;
  declare betweenA: string;
  declare betweenB: string;
  declare atC: number;
  declare source: string;
  /** How and when the value can be measured (engine, ignition, what is unplugged). */
  declare conditions: CreationOptional<string>;
  /** What is measured: resistance, regulated-voltage, ac-output, gap, dwell, capacitance, insulation … */
  declare kind: CreationOptional<string>;
  /** For resistances: the part's conductor ("copper" windings are corrected to 20 °C; "carbon", "other" are not). */
  declare material: CreationOptional<string | null>;
}
SpecValue.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    connectorId: { type: DataTypes.INTEGER, allowNull: false },
    name: { type: DataTypes.STRING, allowNull: false },
    min: { type: DataTypes.REAL, allowNull: false },
    max: { type: DataTypes.REAL, allowNull: true },
    unit: { type: DataTypes.STRING, allowNull: false },
    betweenA: { type: DataTypes.STRING, allowNull: false },
    betweenB: { type: DataTypes.STRING, allowNull: false },
    atC: { type: DataTypes.REAL, allowNull: false, defaultValue: 20 },
    source: { type: DataTypes.STRING, allowNull: false },
    conditions: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    kind: { type: DataTypes.TEXT, allowNull: false, defaultValue: "resistance" },
    material: { type: DataTypes.TEXT, allowNull: true },
  },
  { ...common, tableName: "spec_values", timestamps: false },
);

/** A published version of a connector card, kept whole as a snapshot. */
export class Revision extends Model<InferAttributes<Revision>, InferCreationAttributes<Revision>> {
  declare id: CreationOptional<number>;
  declare connectorId: ForeignKey<number>;
  declare number: number;
  declare snapshot: unknown;
  declare summary: string;
  declare publishedAt: Date;
}
Revision.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    connectorId: { type: DataTypes.INTEGER, allowNull: false },
    number: { type: DataTypes.INTEGER, allowNull: false },
    snapshot: json("snapshot"),
    summary: { type: DataTypes.STRING, allowNull: false, defaultValue: "" },
    publishedAt: { type: DataTypes.DATE, allowNull: false },
  },
  { ...common, tableName: "revisions", timestamps: false },
);

Make.hasMany(Family, { foreignKey: "makeId", as: "families" });
Family.belongsTo(Make, { foreignKey: "makeId", as: "make" });
Family.hasMany(System, { foreignKey: "familyId", as: "systems" });
System.belongsTo(Family, { foreignKey: "familyId", as: "family" });
System.hasMany(Connector, { foreignKey: "systemId", as: "connectors" });
Connector.belongsTo(System, { foreignKey: "systemId", as: "system" });
Connector.belongsTo(Family, { foreignKey: "familyId", as: "family" });
Connector.belongsTo(Connector, { foreignKey: "matesWithId", as: "mate" });
Connector.belongsTo(Component, { foreignKey: "componentId", as: "owner" });
Connector.hasMany(Pin, { foreignKey: "connectorId", as: "pins" });
Connector.hasMany(SpecValue, { foreignKey: "connectorId", as: "specs" });
Pin.belongsTo(Connector, { foreignKey: "connectorId", as: "connector" });
Pin.belongsTo(Component, { foreignKey: "componentId", as: "component" });
