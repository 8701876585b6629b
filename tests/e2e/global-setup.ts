import type { TestProject } from "vitest/node";
import { startE2eServer } from "./server";

declare module "vitest" {
  export interface ProvidedContext {
    /** Where the app under test runs, e.g. http://127.0.0.1:41234 (no trailing slash). */
    baseUrl: string;
    /** The shared password of the three demo accounts. */
    demoPassword: string;
  }
}

/** One server for the whole browser-test run; its URL and the demo password reach tests through inject(). */
export default async function setup(project: TestProject) {
  const server = await startE2eServer();
  if (process.env.E2E_VERBOSE) console.log(server.log.join("\n"));
  project.provide("baseUrl", server.url);
  project.provide("demoPassword", server.demoPassword);
  return () => server.close();
}
