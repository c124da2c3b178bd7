import type { Route } from "./+types/api.v1.photos";
import { assertSameOrigin, requireCan } from "~/services/guards.server";
import { methodNotAllowed } from "~/services/http.server";
import { photoErrorResponse, receivePhotos } from "~/services/photos.server";

/** Uploading changes state, so it is POST only. */
export const loader = () => methodNotAllowed("POST");

/**
 * POST /api/v1/photos (multipart: `photo` one or more files, `caption`, `credit`, `consent`, optional `submission`) →
 * 201 {"photo": the first, "photos": all}; errors in the one error shape (413, 415, 422, 429, 507 …).
 */
export async function action({ request }: Route.ActionArgs) {
  assertSameOrigin(request); // resource routes are not covered by React Router's own origin check (CVE-2026-22030)
  const { user } = await requireCan(request, "submission.create");
  try {
    const { photos } = await receivePhotos(request, user);
    const shown = photos.map((p) => ({ id: p.id, url: p.url, thumbUrl: p.thumbUrl, width: p.width, height: p.height }));
    return Response.json({ photo: shown[0], photos: shown }, { status: 201, headers: { "Cache-Control": "no-store" } });
  } catch (e) {
    return photoErrorResponse(e);
  }
}
