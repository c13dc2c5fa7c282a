import { expect } from "vitest";
import { LeewayError, type ErrorCode } from "@leeway/core";

/**
 * Asserts that `run` throws a LeewayError with the given code whose message
 * contains every one of `mentions` (the parameter name, the value, ...).
 */
export function expectLeewayError(run: () => unknown, code: ErrorCode, ...mentions: string[]): LeewayError {
  let thrown: unknown = undefined;
  try {
    run();
  } catch (error) {
    thrown = error;
  }
  expect(thrown, "expected a LeewayError").toBeInstanceOf(LeewayError);
  const error = thrown as LeewayError;
  expect(error.code).toBe(code);
  for (const m of mentions) expect(error.message).toContain(m);
  return error;
}

/** A JSON round trip, as a snapshot would travel between processes. */
export function throughJson<T>(value: T): T {
  return JSON.parse(JSON.stringify(value)) as T;
}
