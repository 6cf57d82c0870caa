import 'server-only';
import { logger } from '../logger';
import { listReferencedObjectKeysGlobal } from '../queries/runs';
import { deleteObject, listObjects } from '../storage';

/** How long an upload may wait for its run: a presigned URL lives 15 minutes, a CI retry a bit longer. */
export const ORPHAN_AGE_MS = 24 * 3600 * 1000;

/**
 * Removes uploaded objects that no run refers to and that are older than `olderThanMs`: a
 * presigned PUT whose run was never posted, or a file stored by a request that then failed.
 * Objects of runs are never touched. Returns how many objects were removed.
 */
export async function sweepOrphanUploads({
  now = new Date(),
  olderThanMs = ORPHAN_AGE_MS,
}: { now?: Date; olderThanMs?: number } = {}): Promise<number> {
  let removed = 0;
  for await (const page of listObjects('incoming/')) {
    const old = page.filter((o) => now.getTime() - o.lastModified.getTime() >= olderThanMs);
    const referenced = await listReferencedObjectKeysGlobal({ keys: old.map((o) => o.key) });
    for (const o of old) {
      if (referenced.has(o.key)) continue;
      await deleteObject(o.key);
      removed++;
    }
  }
  if (removed > 0) logger.info({ removed }, 'removed uploads that no run refers to');
  return removed;
}
