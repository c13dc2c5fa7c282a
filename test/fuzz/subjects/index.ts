import type { FuzzSubject } from "../probe.js";
import { changeSubjects } from "./change.js";
import { policySubjects } from "./policy.js";
import { poolSubjects } from "./pool.js";
import { framerSubject, randomSubject, simulatorSubject } from "./signal-sim.js";
import { statsSubjects } from "./stats.js";

/** One generator for every snapshot-bearing component of the tree. */
export const FUZZ_SUBJECTS = [randomSubject, ...statsSubjects, ...changeSubjects, ...poolSubjects, framerSubject, simulatorSubject, ...policySubjects] as FuzzSubject<unknown, unknown>[];
