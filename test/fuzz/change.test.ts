import { fuzzLaws, type FuzzRuns } from "./fuzz-suite.js";
import { changeSubjects } from "./subjects/change.js";

const runs: FuzzRuns = { cut: 60, mutation: 100, "bad-sample": 100, extreme: 100 };
const [cusum, pageHinkley, ewma, adwin, ks, martingale, posterior] = changeSubjects;

fuzzLaws(cusum!, runs, ["cut"]);
fuzzLaws(pageHinkley!, runs, ["cut", "mutation"]);
fuzzLaws(ewma!, runs, ["cut"]);
fuzzLaws(adwin!, runs, ["cut", "mutation"]);
fuzzLaws(ks!, runs, ["cut", "mutation", "extreme"]);
fuzzLaws(martingale!, runs);
fuzzLaws(posterior!, runs, ["cut", "bad-sample", "extreme"]);
