// Ring checks against hand-drawn figures: shoelace areas of rectangles (width × height), and
// self-crossing by construction (a figure-eight crosses itself; a convex polygon never does).
import { describe, expect, it } from 'vitest';
import { ringSelfCrosses, ringSignedArea, ringIsClosed } from '../src/geo/ring-checks.js';
import { jsonErrorOffset } from '../src/geo/json-error-position.js';

describe('ring checks', () => {
  it('signed area: counter-clockwise positive, exact for rectangles far from the origin', () => {
    const o = 6_000_000;
    const ccw = [[o, o], [o + 3, o], [o + 3, o + 2], [o, o + 2], [o, o]];
    expect(ringSignedArea(ccw)).toBe(6);
    expect(ringSignedArea([...ccw].reverse())).toBe(-6);
  });

  it('closure tolerance is relative: 1e-13 of 1e6 is closed, 1e-9 of 1e6 is open', () => {
    const base = [[1e6, 0], [1e6 + 1, 0], [1e6 + 1, 1]];
    expect(ringIsClosed([...base, [1e6 * (1 + 1e-13), 0]])).toBe(true);
    expect(ringIsClosed([...base, [1e6 * (1 + 1e-9), 0]])).toBe(false);
  });

  it('finds crossings in small and large rings, and none in convex ones', () => {
    const eight = [[0, 0], [2, 2], [2, 0], [0, 2], [0, 0]];
    expect(ringSelfCrosses(eight)).toBe(true);
    // a 2,000-vertex circle (sorted sweep path) is simple; swapping two vertices makes it cross
    const n = 2000;
    const circle = Array.from({ length: n }, (_, k) => [Math.cos((2 * Math.PI * k) / n), Math.sin((2 * Math.PI * k) / n)]);
    expect(ringSelfCrosses([...circle, circle[0]])).toBe(false);
    const tangled = circle.slice();
    [tangled[10], tangled[500]] = [tangled[500], tangled[10]];
    expect(ringSelfCrosses([...tangled, tangled[0]])).toBe(true);
  });
});

describe('JSON error offset', () => {
  it('points at the first character JSON grammar (RFC 8259) does not allow', () => {
    expect(jsonErrorOffset('{"a": [1, 2,]}')).toBe(12);
    expect(jsonErrorOffset('{"a" 1}')).toBe(5);
    expect(jsonErrorOffset('[1, 2] x')).toBe(7);
    expect(jsonErrorOffset('{"a": [1, {"b": null}]}')).toBe(-1);
  });
});
