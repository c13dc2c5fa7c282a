import { fuzzLaws, type FuzzRuns } from "./fuzz-suite.js";
import { featureEngineSubject, scoreEngineSubject } from "./subjects/policy.js";

const runs: FuzzRuns = { cut: 10, mutation: 15, "bad-sample": 15, extreme: 15 };

fuzzLaws(scoreEngineSubject, runs, ["cut", "bad-sample"]);
fuzzLaws(featureEngineSubject, runs, ["cut", "bad-sample"]);
