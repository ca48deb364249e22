import { requireApiViewer } from "@/app/(auth)/auth";
import { route } from "@/lib/server/http";
import { openApiDocument } from "@/lib/server/openapi";

/** The API's OpenAPI 3.1 description, for anyone signed in (people and API tokens). */
export const GET = route(async (request) => {
  await requireApiViewer(request);
  return Response.json(openApiDocument());
});
