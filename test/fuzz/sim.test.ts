import { fuzzLaws } from "./fuzz-suite.js";
import { simulatorSubject } from "./subjects/signal-sim.js";

fuzzLaws(simulatorSubject, { cut: 20, mutation: 80, "bad-sample": 0, extreme: 0 });
