import { SnapshotError } from "@leeway/core";
import type { ChangeTest } from "./change-test.js";
import { Adwin } from "./adwin.js";
import { ConformalMartingale } from "./conformal-martingale.js";
import { Cusum } from "./cusum.js";
import { EwmaChart } from "./ewma-chart.js";
import { SlidingKsTest } from "./sliding-ks-test.js";
import { PageHinkley } from "./page-hinkley.js";

/**
 * Restores any change test from its snapshot, choosing the class by the snapshot's `kind`.
 * @example
 * const t = restoreChangeTest(new Cusum({ mean: 0, sigma: 1 }).snapshot());
 * t.name; // "Cusum"
 */
export function restoreChangeTest(snapshot: unknown): ChangeTest {
  const kind = typeof snapshot === "object" && snapshot !== null ? (snapshot as { kind?: unknown }).kind : undefined;
  switch (kind) {
    case Cusum.kind:
      return Cusum.restore(snapshot);
    case PageHinkley.kind:
      return PageHinkley.restore(snapshot);
    case EwmaChart.kind:
      return EwmaChart.restore(snapshot);
    case Adwin.kind:
      return Adwin.restore(snapshot);
    case SlidingKsTest.kind:
      return SlidingKsTest.restore(snapshot);
    case ConformalMartingale.kind:
      return ConformalMartingale.restore(snapshot);
    default:
      throw new SnapshotError("a change test", "kind", `must be one of ${[Cusum.kind, PageHinkley.kind, EwmaChart.kind, Adwin.kind, SlidingKsTest.kind, ConformalMartingale.kind].join(", ")}, got ${JSON.stringify(kind) ?? "undefined"}`);
  }
}
