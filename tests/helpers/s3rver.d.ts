// s3rver 3.7.1 ships no types; the part the storage test uses.
declare module "s3rver" {
  import type { AddressInfo } from "node:net";
  export default class S3rver {
    constructor(opts: {
      address?: string;
      port?: number;
      directory: string;
      silent?: boolean;
      configureBuckets?: Array<{ name: string }>;
    });
    run(): Promise<AddressInfo>;
    close(): Promise<void>;
  }
}
