// Point–segment distance: hand-checkable cases (Pythagoras) and random cases against three.js
// Line3.closestPointToPoint (npm reference library), clamped to the segment.
import fc from 'fast-check';
import { Line3, Vector3 } from 'three';
import { describe, expect, it } from 'vitest';
import { closestParamOnSegment, pointSegmentDistance } from '../../engine/index/shaftIndex.ts';

describe('pointSegmentDistance', () => {
  // Segment A = (0,0,0) → B = (10,0,0); 3-4-5 right triangles (Pythagoras) give exact answers.
  it('interior projection: (5,3,4) is 5 from the foot (5,0,0)', () => {
    expect(pointSegmentDistance(5, 3, 4, 0, 0, 0, 10, 0, 0)).toBe(5);
    expect(closestParamOnSegment(5, 3, 4, 0, 0, 0, 10, 0, 0)).toBe(0.5);
  });

  it('beyond the start: (-3,4,0) is 5 from endpoint A', () => {
    expect(pointSegmentDistance(-3, 4, 0, 0, 0, 0, 10, 0, 0)).toBe(5);
    expect(closestParamOnSegment(-3, 4, 0, 0, 0, 0, 10, 0, 0)).toBe(0);
  });

  it('beyond the end: (13,0,4) is 5 from endpoint B', () => {
    expect(pointSegmentDistance(13, 0, 4, 0, 0, 0, 10, 0, 0)).toBe(5);
    expect(closestParamOnSegment(13, 0, 4, 0, 0, 0, 10, 0, 0)).toBe(1);
  });

  it('on the segment: distance 0', () => {
    expect(pointSegmentDistance(2.5, 0, 0, 0, 0, 0, 10, 0, 0)).toBe(0);
  });

  it('oblique segment: (0,0,0)→(2,2,0), point (0,2,0) projects to (1,1,0), distance √2', () => {
    expect(pointSegmentDistance(0, 2, 0, 0, 0, 0, 2, 2, 0)).toBeCloseTo(Math.SQRT2, 14);
  });

  it('zero-length segment: plain point distance', () => {
    expect(pointSegmentDistance(3, 4, 12, 0, 0, 0, 0, 0, 0)).toBe(13); // 3-4-12-13 quadruple
  });

  it('agrees with three.js Line3.closestPointToPoint on random cases', () => {
    const c = fc.double({ min: -100, max: 100, noNaN: true });
    const line = new Line3(), p = new Vector3(), q = new Vector3();
    fc.assert(
      fc.property(fc.tuple(c, c, c), fc.tuple(c, c, c), fc.tuple(c, c, c), (P, A, B) => {
        line.start.set(...A);
        line.end.set(...B);
        p.set(...P);
        const ref = line.closestPointToPoint(p, true, q).distanceTo(p);
        const d = pointSegmentDistance(...P, ...A, ...B);
        expect(Math.abs(d - ref)).toBeLessThanOrEqual(1e-9 * (1 + ref));
      }),
      { numRuns: 2000 },
    );
  });
});
