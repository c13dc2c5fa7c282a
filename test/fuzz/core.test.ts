import { fuzzLaws } from "./fuzz-suite.js";
import { randomSubject } from "./subjects/signal-sim.js";

fuzzLaws(randomSubject, { cut: 100, mutation: 200, "bad-sample": 0, extreme: 0 });
