import { OptionError } from "./errors.js";

const UNIT_SECONDS: Readonly<Record<string, number>> = { ms: 0.001, s: 1, m: 60, min: 60, h: 3600, d: 86400 };
const DURATION = /^\s*(\d+(?:\.\d+)?)\s*(ms|s|min|m|h|d)\s*$/;

/**
 * Seconds in a duration written as a number and a unit: "250ms", "90s",
 * "15m" (or "15min"), "4h", "2d". Throws OptionError for anything else.
 * @example
 * parseDuration("15m"); // 900
 * parseDuration("1.5h"); // 5400
 */
export function parseDuration(text: string, component = "duration", option = "value"): number {
  const match = DURATION.exec(text);
  const seconds = match === null ? Number.NaN : Number(match[1]) * (UNIT_SECONDS[match[2] as string] as number);
  if (!(seconds > 0) || !Number.isFinite(seconds)) throw new OptionError(component, option, text, 'a duration > 0 such as "250ms", "90s", "15m", "4h" or "2d"');
  return seconds;
}

/**
 * The period of a sample in seconds from a number (seconds) or a duration
 * ("1s", "10m"). Throws OptionError naming the option otherwise.
 * @example
 * samplePeriodOption("Engine", "samplePeriod", "10m"); // 600
 */
export function samplePeriodOption(component: string, option: string, value: unknown): number {
  if (typeof value === "number" && Number.isFinite(value) && value > 0) return value;
  if (typeof value === "string") return parseDuration(value, component, option);
  throw new OptionError(component, option, value, 'a period > 0 in seconds, or a duration such as "1s" or "10m"');
}
