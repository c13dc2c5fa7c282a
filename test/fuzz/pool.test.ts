import { fuzzLaws, type FuzzRuns } from "./fuzz-suite.js";
import { autoencoderSubject, frozenSubject, poolSubject } from "./subjects/pool.js";

const runs: FuzzRuns = { cut: 40, mutation: 60, "bad-sample": 60, extreme: 60 };

fuzzLaws(autoencoderSubject, runs);
fuzzLaws(frozenSubject, runs);
fuzzLaws(poolSubject, runs);
