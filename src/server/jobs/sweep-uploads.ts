import 'server-only';
import { sweepOrphanUploads } from '../services/upload-sweep';

/** Job `sweep-uploads`: hourly removal of uploads no run refers to (services/upload-sweep.ts). */
export async function sweepUploadsJob(): Promise<void> {
  await sweepOrphanUploads();
}
