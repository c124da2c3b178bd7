import { type RouteConfig, index, route } from "@react-router/dev/routes";

// The only place a URL is declared. Pages first, then the JSON API (../shared/API.md), then the 404s.
export default [
  index("routes/_index.tsx"),
  route("makes/:make", "routes/makes.$make.tsx"),
  route("families/:family", "routes/families.$family.tsx"),
  route("connectors/:connector", "routes/connectors.$connector.tsx"),
  route("colours", "routes/colours.tsx"),

  route("api/v1/health", "routes/api.v1.health.ts"),
  route("api/v1/makes", "routes/api.v1.makes.ts"),
  route("api/v1/families", "routes/api.v1.families.ts"),
  route("api/v1/families/:slug", "routes/api.v1.families.$slug.ts"),
  route("api/v1/connectors/:slug", "routes/api.v1.connectors.$slug.ts"),
  route("api/v1/connectors/:slug/face", "routes/api.v1.connectors.$slug.face.ts"),
  route("api/v1/colours/systems", "routes/api.v1.colours.systems.ts"),
  route("api/v1/colours/decode", "routes/api.v1.colours.decode.ts"),
  route("api/*", "routes/api.$.ts"),

  route("*", "routes/$.tsx"),
] satisfies RouteConfig;
