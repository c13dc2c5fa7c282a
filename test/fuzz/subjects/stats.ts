import fc from "fast-check";
import { EwMoments, Moments, P2Quantile, QuantileSketch, WindowMoments, WindowTrend } from "@leeway/stats";
import { given, nonFinite, scalarSubject } from "./streams.js";

/** Generators for every snapshot-bearing component of @leeway/stats. */
export const statsSubjects = [
  scalarSubject("Moments", fc.record({ weighted: fc.constantFrom(undefined, false, true), nonFinite }).map(given), (o) => new Moments(o), Moments.restore),
  scalarSubject(
    "EwMoments",
    fc.oneof(fc.record({ halfLife: fc.double({ min: 1, max: 500, noNaN: true }), nonFinite }), fc.record({ alpha: fc.double({ min: 0.001, max: 1, noNaN: true }), nonFinite })).map(given),
    (o) => new EwMoments(o),
    EwMoments.restore,
  ),
  scalarSubject("WindowMoments", fc.record({ width: fc.integer({ min: 1, max: 20 }), nonFinite }).map(given), (o) => new WindowMoments(o), WindowMoments.restore),
  scalarSubject("P2Quantile", fc.record({ p: fc.double({ min: 0.01, max: 0.99, noNaN: true }), nonFinite }).map(given), (o) => new P2Quantile(o), P2Quantile.restore),
  scalarSubject("QuantileSketch", fc.record({ k: fc.constantFrom(undefined, 8, 16, 64), seed: fc.integer({ min: 0, max: 1000 }), nonFinite }).map(given), (o) => new QuantileSketch(o), QuantileSketch.restore),
  scalarSubject("WindowTrend", fc.record({ width: fc.integer({ min: 3, max: 30 }), nonFinite }).map(given), (o) => new WindowTrend(o), WindowTrend.restore),
];
