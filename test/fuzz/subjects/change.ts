import fc from "fast-check";
import { Adwin, ChangePointPosterior, ConformalMartingale, Cusum, EwmaChart, PageHinkley, SlidingKsTest } from "@leeway/change";
import { given, nonFinite, scalarSubject } from "./streams.js";

const sides = fc.constantFrom(undefined, "up", "down", "both");

/** Generators for every snapshot-bearing component of @leeway/change. */
export const changeSubjects = [
  scalarSubject(
    "Cusum",
    fc.oneof(
      fc.record({ k: fc.double({ min: 0.1, max: 2, noNaN: true }), h: fc.double({ min: 1, max: 10, noNaN: true }), mean: fc.double({ min: -5, max: 5, noNaN: true }), sigma: fc.double({ min: 0.1, max: 5, noNaN: true }), direction: sides, nonFinite }),
      fc.record({ h: fc.double({ min: 1, max: 10, noNaN: true }), burnIn: fc.integer({ min: 2, max: 10 }), direction: sides, nonFinite }),
    ).map(given),
    (o) => new Cusum(o),
    Cusum.restore,
  ),
  scalarSubject(
    "PageHinkley",
    fc.record({ alarmLevel: fc.double({ min: 1, max: 50, noNaN: true }), tolerance: fc.constantFrom(undefined, 0, 0.1, 1), direction: sides, meanForgetting: fc.constantFrom(undefined, 1, 0.99), armAfter: fc.constantFrom(undefined, 1, 5), nonFinite }).map(given),
    (o) => new PageHinkley(o),
    PageHinkley.restore,
  ),
  scalarSubject(
    "EwmaChart",
    fc.oneof(
      fc.record({ lambda: fc.double({ min: 0.05, max: 1, noNaN: true }), L: fc.double({ min: 1, max: 4, noNaN: true }), mean: fc.double({ min: -5, max: 5, noNaN: true }), sigma: fc.double({ min: 0.1, max: 5, noNaN: true }), direction: sides, nonFinite }),
      fc.record({ lambda: fc.double({ min: 0.05, max: 1, noNaN: true }), burnIn: fc.integer({ min: 2, max: 10 }), nonFinite }),
    ).map(given),
    (o) => new EwmaChart(o),
    EwmaChart.restore,
  ),
  scalarSubject(
    "Adwin",
    fc.record({ delta: fc.constantFrom(undefined, 0.002, 0.1), buckets: fc.constantFrom(undefined, 2, 5), checkPeriod: fc.constantFrom(undefined, 1, 4), minSubWindow: fc.constantFrom(undefined, 1, 3), nonFinite }).map(given),
    (o) => new Adwin(o),
    Adwin.restore,
  ),
  scalarSubject(
    "SlidingKsTest",
    fc.record({ recentSize: fc.integer({ min: 8, max: 20 }), checkPeriod: fc.constantFrom(undefined, 1, 3), nonFinite }).map(given),
    (o) => new SlidingKsTest(o),
    SlidingKsTest.restore,
  ),
  scalarSubject(
    "ConformalMartingale",
    fc.record({ threshold: fc.constantFrom(undefined, 20, 100), betting: fc.constantFrom(undefined, "jumper", "power", "mixture"), burnIn: fc.constantFrom(undefined, 10, 20), direction: sides, seed: fc.integer({ min: 0, max: 1000 }), nonFinite }).map(given),
    (o) => new ConformalMartingale(o),
    ConformalMartingale.restore,
  ),
  scalarSubject(
    "ChangePointPosterior",
    fc.oneof(
      fc.record({ scale: fc.constant("linear"), mean: fc.double({ min: -5, max: 5, noNaN: true }), sigma: fc.double({ min: 0.1, max: 5, noNaN: true }), expectedRunLength: fc.constantFrom(undefined, 20, 100), maxHypotheses: fc.constantFrom(undefined, 16), nonFinite }),
      fc.record({ scale: fc.constant("linear"), burnIn: fc.integer({ min: 3, max: 10 }), nonFinite }),
    ).map(given),
    (o) => new ChangePointPosterior(o),
    ChangePointPosterior.restore,
  ),
];
