import { describe, expect, it } from "vitest";
import { DimensionError, LeewayError, NonFiniteError, OptionError, SampleError, SnapshotError, StateError, describeValue, typeOf } from "@leeway/core";

describe("error classes", () => {
  it("carry stable codes and name the parameter, the value and what is allowed", () => {
    const option = new OptionError("Cusum", "h", -1, "a finite number > 0");
    expect(option).toBeInstanceOf(LeewayError);
    expect(option).toBeInstanceOf(Error);
    expect(option.code).toBe("E_OPTION");
    expect(option.name).toBe("OptionError");
    expect(option.message).toBe("Cusum: option h must be a finite number > 0, got -1");
    expect(new OptionError("Cusum", "h", "5", "a finite number > 0").message).toBe('Cusum: option h must be a finite number > 0, got "5" (string)');
    expect(new OptionError("Cusum", "h", false, "a finite number > 0").message).toBe("Cusum: option h must be a finite number > 0, got false (boolean)");
    expect(new NonFiniteError("Moments", "x", Number.NaN).message).toBe("Moments: x must be a finite number, got NaN");
    expect(new NonFiniteError("Moments", "x", Infinity).code).toBe("E_NON_FINITE");
    const dim = new DimensionError("Pool", "x", 256, 255);
    expect(dim.code).toBe("E_DIMENSION");
    expect(dim.message).toBe("Pool: x must have length 256, got length 255");
    expect(new SnapshotError("leeway.stats.moments", "state.count", "is missing").message).toBe("snapshot of leeway.stats.moments: state.count is missing");
    expect(new SnapshotError("k", "p", "x").code).toBe("E_SNAPSHOT");
    expect(new StateError("Engine", "nothing to acknowledge").code).toBe("E_STATE");
    const sample = new SampleError("Moments", "x", "5", "a number");
    expect(sample.code).toBe("E_SAMPLE");
    expect(sample.message).toBe('Moments: x must be a number, got "5" (string)');
    expect(new SampleError("Cusum", "x", 1e200, "a finite number in [-1e+150, 1e+150]").message).toBe("Cusum: x must be a finite number in [-1e+150, 1e+150], got 1e+200");
  });

  it("describe values readably", () => {
    expect(describeValue(-0)).toBe("-0");
    expect(describeValue("abc")).toBe('"abc"');
    expect(describeValue([1, 2])).toBe("an array of length 2");
    expect(describeValue(new Float64Array(3))).toBe("a Float64Array of length 3");
    expect(describeValue(undefined)).toBe("undefined");
    expect(describeValue({})).toBe("an object");
    expect(describeValue(() => 1)).toBe("a function");
    expect(describeValue("x".repeat(100)).length).toBeLessThan(70);
    expect([typeOf(null), typeOf([]), typeOf(new Float32Array(1)), typeOf("a"), typeOf(1)]).toEqual(["null", "array", "Float32Array", "string", "number"]);
  });
});
