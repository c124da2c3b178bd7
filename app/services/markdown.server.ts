import { marked } from "marked";
import sanitizeHtml from "sanitize-html";

// marked does not sanitize; sanitize-html then keeps a small allow-list with http(s)/mailto links only.
const OPTIONS: sanitizeHtml.IOptions = {
  allowedTags: ["p", "br", "strong", "em", "code", "pre", "ul", "ol", "li", "blockquote", "h3", "h4", "a", "table", "thead", "tbody", "tr", "th", "td", "hr"],
  allowedAttributes: { a: ["href", "title", "rel"] },
  allowedSchemes: ["http", "https", "mailto"],
  allowProtocolRelative: false,
  transformTags: { a: sanitizeHtml.simpleTransform("a", { rel: "noopener noreferrer nofollow" }) },
};

/** Notes written in Markdown, rendered to HTML that is safe to insert. */
export function renderNotes(markdown: string): string {
  return sanitizeHtml(marked.parse(markdown, { async: false, gfm: true }), OPTIONS);
}
