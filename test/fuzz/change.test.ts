import { fuzzLaws, type FuzzRuns } from "./fuzz-suite.js";
import { changeSubjects } from "./subjects/change.js";

const runs: FuzzRuns = { cut: 60, mutation: 100, "bad-sample": 100, extreme: 100 };
const posterior = changeSubjects[changeSubjects.length - 1]!;

for (const subject of changeSubjects.slice(0, -1)) fuzzLaws(subject, runs);
fuzzLaws(posterior, runs, ["cut", "bad-sample", "extreme"]);
