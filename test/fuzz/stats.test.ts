import { fuzzLaws, type FuzzRuns } from "./fuzz-suite.js";
import { statsSubjects } from "./subjects/stats.js";

const runs: FuzzRuns = { cut: 60, mutation: 100, "bad-sample": 100, extreme: 100 };
const [moments, ewMoments, windowMoments, p2, sketch, windowTrend] = statsSubjects;

fuzzLaws(moments!, runs, ["cut", "mutation"]);
fuzzLaws(ewMoments!, runs, ["cut", "mutation"]);
fuzzLaws(windowMoments!, runs, ["cut", "mutation"]);
fuzzLaws(p2!, runs, ["cut", "mutation"]);
fuzzLaws(sketch!, runs, ["cut", "mutation", "extreme"]);
fuzzLaws(windowTrend!, runs, ["cut", "mutation", "extreme"]);
