declare module "s3rver" {
  import type { AddressInfo } from "node:net";
  type Options = {
    port?: number;
    address?: string;
    silent?: boolean;
    directory: string;
    configureBuckets?: { name: string }[];
  };
  export default class S3rver {
    constructor(options: Options);
    run(): Promise<AddressInfo>;
    close(): Promise<void>;
  }
}
