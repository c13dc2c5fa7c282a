import { fuzzLaws, type FuzzRuns } from "./fuzz-suite.js";
import { frozenSubject } from "./subjects/pool.js";

const runs: FuzzRuns = { cut: 40, mutation: 60, "bad-sample": 60, extreme: 60 };

fuzzLaws(frozenSubject, runs, ["cut"]);
