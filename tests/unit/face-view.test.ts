import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { FaceView, type FaceCavityPaint } from "~/components/face-view";
import { faceGeometry, gridLayout } from "~/domain/connector-face";

// Invented demo paint for a 2×3 housing with one empty cavity.
const geometry = faceGeometry(gridLayout(2, 3, { latch: "left" }));
const paint: FaceCavityPaint[] = [
  { cavity: "1", code: "W/R", baseHex: "#ffffff", tracerHexes: ["#d0202a"], title: "W/R white with red tracer" },
  { cavity: "2", code: "B", baseHex: "#111111", tracerHexes: [] },
  { cavity: "3", code: "Y/G", baseHex: "#f5d90a", tracerHexes: ["#1f8a3a"], href: "/connectors/demo-a#cavity-3" },
  { cavity: "4", code: "L/W/B", baseHex: "#1f4fd0", tracerHexes: ["#ffffff", "#111111"] },
  { cavity: "5", code: "Lg", baseHex: null, tracerHexes: [] },
  // cavity 6 has no wire
];

const render = (props: Partial<Parameters<typeof FaceView>[0]> = {}) => renderToStaticMarkup(createElement(FaceView, { geometry, paint, ...props }));

const count = (html: string, re: RegExp) => (html.match(re) ?? []).length;

describe("FaceView", () => {
  it("renders one accessible svg with one group per cavity and every code as text", () => {
    const html = render({ caption: "Mating face of demo connector A", highlight: "4" });
    expect(html.startsWith("<svg")).toBe(true);
    expect(count(html, /<svg/g)).toBe(1);
    expect(html).toContain('role="img"');
    expect(html).toContain('aria-label="Mating face of demo connector A"');
    expect(html).toContain("<title>Mating face of demo connector A</title>");
    expect(count(html, /data-cavity="/g)).toBe(geometry.cavities.length);
    for (const code of ["W/R", "B", "Y/G", "L/W/B", "Lg"]) expect(html).toContain(`data-code="true">${code}</text>`);
    expect(count(html, /data-code="true"/g)).toBe(5);
    expect(html).toContain("<title>Cavity 1 (pin 1): W/R white with red tracer</title>");
    expect(html).toContain("<title>Cavity 2: B</title>");
    expect(html).toContain("<title>Cavity 6: empty</title>");
    expect(html).toContain('data-empty="true"');
    expect(count(html, /data-pin1="true"/g)).toBe(1);
    expect(count(html, /data-highlight="true"/g)).toBe(1);
    expect(html).toMatch(/<g data-latch="left">.*>latch<\/text>/);
    // Latch on the left: the tab's room on that side only (0.95 pitch), a thin edge elsewhere (0.15 pitch).
    expect(html).toContain('viewBox="-29.5 -16.5 51 33"');
  });

  it("links a cavity with an href so the drawing works without JavaScript", () => {
    const html = render();
    expect(count(html, /<a /g)).toBe(1);
    expect(html).toContain('href="/connectors/demo-a#cavity-3"');
  });

  it("gives each instance its own clip-path id", () => {
    const two = renderToStaticMarkup(createElement("div", null, createElement(FaceView, { geometry, paint }), createElement(FaceView, { geometry, paint })));
    const ids = [...two.matchAll(/<clipPath id="([^"]+)"/g)].map((m) => m[1]);
    expect(ids).toHaveLength(2);
    expect(ids[0]).not.toBe(ids[1]);
    for (const id of ids) expect(two).toContain(`url(#${id})`);
  });

  it("draws a thumbnail without text apart from titles", () => {
    const html = render({ size: "thumb" });
    expect(html).toContain('width="96"');
    expect(count(html, /<text/g)).toBe(0);
    expect(count(html, /data-cavity="/g)).toBe(geometry.cavities.length);
  });
});
