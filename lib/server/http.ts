import { ZodError, type z } from "zod";
import { AppError, isAppError } from "@/lib/errors";
import { crossSiteRefusal } from "./origin";
import { rateLimitRefusal, type RateLimitKind } from "./rate-limit";
import { allowedOrigins, apiRateLimiter } from "./runtime";
import { storageHealth } from "./runtime";
import { storageFailure, storageUnavailable } from "./storage-health";

// Every route handler goes through `route()`: one place turns thrown errors into
// the shared error body, so no handler can leak a stack trace or forget a status.
type Handler<C> = (request: Request, context: C) => Promise<Response>;

export interface RouteOptions {
  /** Counts a read against a per-caller limit; writes (POST/PUT/PATCH/DELETE) are always counted. */
  rateLimit?: RateLimitKind;
}

export function route<C>(handler: Handler<C>, opts: RouteOptions = {}): Handler<C> {
  return async (request, context) => {
    try {
      const refusal =
        crossSiteRefusal(request, allowedOrigins()) ??
        (await rateLimitRefusal(request, opts.rateLimit, apiRateLimiter()));
      if (refusal) return refusal;
      return await handler(request, context);
    } catch (err) {
      if (isAppError(err)) return Response.json(err.toBody(), { status: err.status });
      if (err instanceof ZodError) {
        const e = new AppError(
          "bad_request",
          "The request is not valid.",
          err.issues.map((i) => ({ path: i.path.join("."), message: i.message })),
        );
        return Response.json(e.toBody(), { status: 400 });
      }
      const storage = storageFailure(err);
      if (storage) {
        storageHealth().report(err, `api ${request.method} ${new URL(request.url).pathname}`);
        return Response.json(storageUnavailable(storage.kind).toBody(), { status: 503 });
      }
      console.error(`[api] ${request.method} ${new URL(request.url).pathname}:`, err);
      return Response.json(new AppError("internal", "Something went wrong on our side.").toBody(), { status: 500 });
    }
  };
}

/** Reads and validates a JSON body; a malformed body is a 400, not a 500. */
export async function readJson<S extends z.ZodType>(request: Request, schema: S): Promise<z.infer<S>> {
  // A cross-site form can send text/plain without a CORS preflight, never application/json
  // (OWASP ASVS 5.0 §3.5.2; 415 per RFC 9110 §15.5.16).
  const mediaType = request.headers.get("content-type")?.split(";")[0].trim().toLowerCase();
  if (mediaType !== "application/json")
    throw new AppError("unsupported_media_type", "Send the body as JSON, with Content-Type: application/json.");
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    throw new AppError("bad_request", "The request body must be JSON.");
  }
  return schema.parse(body);
}

/**
 * A dynamic path segment as stored: ids such as `site:CH-1` arrive percent-encoded (`%3A`) when a
 * link or fetch encoded them, and Next passes some segments on undecoded.
 */
export function pathParam(value: string): string {
  try {
    return decodeURIComponent(value);
  } catch {
    return value;
  }
}
