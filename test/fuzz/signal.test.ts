import { fuzzLaws } from "./fuzz-suite.js";
import { framerSubject } from "./subjects/signal-sim.js";

fuzzLaws(framerSubject, { cut: 100, mutation: 200, "bad-sample": 150, extreme: 150 });
