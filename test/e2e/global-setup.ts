/**
 * Builds the browser bundles once per e2e run (production, into test-output/dist-web) before any e2e
 * file starts, instead of once per file: the files run side by side and used to build three times.
 */
import { buildWeb } from './harness.js';

export default function setup(): void {
  buildWeb();
}
