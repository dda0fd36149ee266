/** Run before every test file (vitest setupFiles): its scratch folders go when the file's tests are done. */
import { afterAll } from 'vitest';
import { removeScratch } from './scratch.ts';

afterAll(removeScratch);
