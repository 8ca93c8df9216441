// Each test file gets a queue of its own, so files running side by side on the
// shared Redis never take each other's jobs.
import { randomUUID } from 'node:crypto';

process.env.INFALL_QUEUE = `infall-test-${randomUUID().slice(0, 8)}`;
