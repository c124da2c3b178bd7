import { apiError } from "~/services/http.server";

const notFound = ({ request }: { request: Request }) =>
  apiError(404, "not_found", `Nothing answers at ${new URL(request.url).pathname}; see /api/v1/health and the API description.`);

/** Unknown API addresses get the JSON error shape, not the HTML 404 page. */
export const loader = notFound;
export const action = notFound;
