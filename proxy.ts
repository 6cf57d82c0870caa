import { NextResponse } from 'next/server';
import { securityHeaders } from '@/src/lib/security-headers';

/** Adds the security headers to every response (see src/lib/security-headers.ts). */
export function proxy(): NextResponse {
  const response = NextResponse.next();
  for (const [name, value] of Object.entries(securityHeaders(process.env))) response.headers.set(name, value);
  return response;
}

export const config = {
  // Everything but Next's own static files, which carry no markup.
  matcher: ['/((?!_next/static|_next/image|favicon.ico).*)'],
};
