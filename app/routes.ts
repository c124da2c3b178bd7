import { type RouteConfig, index, route } from "@react-router/dev/routes";

// The only place a URL is declared. Pages first, then the JSON API (../shared/API.md), then the 404s.
export default [
  index("routes/_index.tsx"),
  route("makes/:make", "routes/makes.$make.tsx"),
  route("families/:family", "routes/families.$family.tsx"),
  route("families/:family/circuits", "routes/families.$family.circuits.tsx"),
  route("families/:family/circuits/:circuit", "routes/families.$family.circuits.$circuit.tsx"),
  route("connectors/:connector", "routes/connectors.$connector.tsx"),
  route("colours", "routes/colours.tsx"),
  route("finder", "routes/finder.tsx"),
  route("bench", "routes/bench.tsx"),
  route("planner", "routes/planner.tsx"),
  route("planner/cut-list.csv", "routes/planner.cut-list[.]csv.ts"),

  route("api/v1/health", "routes/api.v1.health.ts"),
  route("api/v1/makes", "routes/api.v1.makes.ts"),
  route("api/v1/families", "routes/api.v1.families.ts"),
  route("api/v1/families/:slug", "routes/api.v1.families.$slug.ts"),
  route("api/v1/connectors/:slug", "routes/api.v1.connectors.$slug.ts"),
  route("api/v1/connectors/:slug/face", "routes/api.v1.connectors.$slug.face.ts"),
  route("api/v1/colours/systems", "routes/api.v1.colours.systems.ts"),
  route("api/v1/colours/decode", "routes/api.v1.colours.decode.ts"),
  route("api/v1/colour-finder", "routes/api.v1.colour-finder.ts"),
  route("api/v1/wire-size", "routes/api.v1.wire-size.ts"),
  route("api/v1/bench", "routes/api.v1.bench.ts"),
  route("api/v1/families/:slug/circuits", "routes/api.v1.families.$slug.circuits.ts"),
  route("api/v1/families/:slug/circuits/:circuit/walk", "routes/api.v1.families.$slug.circuits.$circuit.walk.ts"),
  route("api/v1/families/:slug/circuits/:circuit/diagnose", "routes/api.v1.families.$slug.circuits.$circuit.diagnose.ts"),
  route("api/*", "routes/api.$.ts"),

  route("*", "routes/$.tsx"),
] satisfies RouteConfig;
