import { describe, expect, it } from 'vitest';
import { buildReport } from '../src/report/index.js';
import { fakeResult } from './helpers/fake-result.js';

// Project rule: every results sheet carries the cautions (association is not causation, ecological
// fallacy, the neighbour definition changes answers, small-area rates are unstable, local expertise).
describe('cautions on every results sheet', () => {
  const report = buildReport(fakeResult());
  const text = (blocks: { kind: string; text?: string }[]) => blocks.map((b) => b.text ?? '').join(' ');
  for (const sheet of report.sheets) {
    it(`${sheet.name} reminds the reader of the limits`, () => {
      const all = text(sheet.blocks);
      expect(all).toMatch(/not cause|not proof of cause|association/i);
      expect(all).toMatch(/not people|individuals/i);
      expect(all).toMatch(/neighbour/i);
      expect(all).toMatch(/small areas|few people/i);
      expect(all).toMatch(/know the places|know these places/i);
    });
  }
});
