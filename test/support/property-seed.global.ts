import type { TestProject } from "vitest/node";
import { describePropertySettings, readPropertySettings, type PropertySettings } from "./property-seed.js";

declare module "vitest" {
  export interface ProvidedContext {
    propertySettings: PropertySettings;
  }
}

/** Chooses the run's fast-check seed once, prints it, and hands it to every test worker. */
export default function setup(project: TestProject): void {
  const settings = readPropertySettings(process.env);
  console.log(describePropertySettings(settings));
  project.provide("propertySettings", settings);
}
