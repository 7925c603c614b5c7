// Registers every background job handler with the queue. Features add their handlers here.
import type { AppContext } from '../context.js';

export async function startJobs(ctx: AppContext): Promise<void> {
  void ctx;
}
