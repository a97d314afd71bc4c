// The exploration queue (shared by the app, which sends, and the workers, which work it).
import type { QueueDefinition } from '../jobs/queue';

export const EXPLORE_QUEUE = 'explore-run';
/** retries after a lost worker (each retry starts the run again) */
export const EXPLORE_QUEUES: QueueDefinition[] = [{ name: EXPLORE_QUEUE, retryLimit: 5 }];
