import { fuzzLaws, type FuzzRuns } from "./fuzz-suite.js";
import { statsSubjects } from "./subjects/stats.js";

const runs: FuzzRuns = { cut: 60, mutation: 100, "bad-sample": 100, extreme: 100 };

for (const subject of statsSubjects) fuzzLaws(subject, runs);
