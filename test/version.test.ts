// Source: the project's own package.json, the record users see beside every result (a consistency check).
import { expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { ENGINE_VERSION } from '../src/version.js';

it('the engine version written into run records equals package.json', () => {
  const pkg = JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8'));
  expect(ENGINE_VERSION).toBe(pkg.version);
});
