// GET /api/v1/openapi.json: the API's OpenAPI 3.1 document (public: it describes, it holds no data).
import { openApiDocument } from "@/lib/api/openapi";

export const dynamic = "force-static";

export function GET() {
  return Response.json(openApiDocument(), { headers: { "Cache-Control": "public, max-age=300" } });
}
