/**
 * The caution every report and the command's help carry (the project's
 * safety statement): leeway is a decision aid, not a safety function.
 */
export const SAFETY_CAUTION =
  "A missed alarm on a machine can injure people and destroy equipment. leeway is a decision aid for condition monitoring, not a safety function: protective trips and interlocks stay with certified safety systems. Validate every threshold on your own machines before you rely on it, and follow local codes, the machine maker's limits and licensed engineering practice.";
