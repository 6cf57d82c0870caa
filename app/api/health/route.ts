import { NextResponse } from 'next/server';
import { checkHealth } from '@/src/server/health';

export const dynamic = 'force-dynamic';

/** 200 when the database, object storage and mail all answer; 503 naming the ones that do not. */
export async function GET(): Promise<NextResponse> {
  const report = await checkHealth();
  const body = report.ok
    ? { status: 'ok', services: report.services }
    : {
        status: 'degraded',
        message: `unavailable: ${report.down.join(', ')}`,
        down: report.down,
        services: report.services,
      };
  return NextResponse.json(body, { status: report.ok ? 200 : 503, headers: { 'cache-control': 'no-store' } });
}
