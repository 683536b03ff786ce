// negotiator 1.1 ships no types; the one call server/middleware/compress.ts makes.
declare module "negotiator" {
  import type { IncomingMessage } from "node:http";
  export default class Negotiator {
    constructor(request: IncomingMessage);
    /** The best of `available` the request accepts; ties go to the earliest of `preferred`. */
    encoding(available?: string[], options?: { preferred?: string[] }): string | undefined;
  }
}
