// pg-cursor 2.22.1 ships no types; this is the part Tideline uses (Kysely's `stream()` and the CSV's own reads).
declare module "pg-cursor" {
  import type { Submittable } from "pg";
  class Cursor<T = Record<string, unknown>> implements Submittable {
    constructor(text: string, values?: unknown[], config?: { rowMode?: "array"; types?: unknown });
    submit: Submittable["submit"];
    read(rows: number): Promise<T[]>;
    close(): Promise<void>;
  }
  export default Cursor;
}
