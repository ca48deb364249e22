import { NextResponse, type NextRequest } from "next/server";
import { SESSION_COOKIES } from "@/lib/auth/session";

// Only a cheap redirect for visitors with no session cookie at all. Real authorization
// happens where data is read (db/queries take the viewer); this is not a security layer.

export function proxy(request: NextRequest) {
  if (SESSION_COOKIES.some((name) => request.cookies.has(name))) return NextResponse.next();
  const url = request.nextUrl.clone();
  url.pathname = "/sign-in";
  url.search = "";
  return NextResponse.redirect(url);
}

export const config = {
  // Pages only: the API answers 401 itself, and sign-in, the e-mailed links' pages, the service worker, assets
  // and health stay public.
  matcher: [
    "/((?!api|sign-in|ack|invite|reset-password|forgot-password|_next|icon.svg|favicon.ico|sw.js|manifest.webmanifest|icons/).*)",
  ],
};
