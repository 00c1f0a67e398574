// Setup file of the `server-pg` vitest project: each test file closes the PostgreSQL pools its
// harnesses opened, so no idle connection outlives the file.
import { afterAll } from 'vitest';
import { closeTestStores } from './test-store.js';

afterAll(closeTestStores);
