import { describe, expect, it } from "vitest";
import { demoDecisions, digestOf, featureDecisions, scoreOnlyDecisions } from "./decision-digest.js";

// The fixtures were written from the engine as it decided when they were committed; a change of any
// decision (action, cause, phase or any evidence number, to the last bit) changes the digest.
describe("decision logs stay as committed", () => {
  it("the demo's scenario at 24 samples per hour (three feature-mode engines, scripted operator)", async () => {
    await expect(JSON.stringify(digestOf(demoDecisions(24)), null, 2) + "\n").toMatchFileSnapshot("./fixtures/demo-scale-24.digest.json");
  });
  it("a feature-mode engine through a second operating pattern and back", async () => {
    await expect(JSON.stringify(digestOf(featureDecisions()), null, 2) + "\n").toMatchFileSnapshot("./fixtures/feature-modes.digest.json");
  });
  it("a score-only engine through drift, a clog and a slow rise", async () => {
    await expect(JSON.stringify(digestOf(scoreOnlyDecisions()), null, 2) + "\n").toMatchFileSnapshot("./fixtures/score-only.digest.json");
  });
});
