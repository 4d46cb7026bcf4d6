// The part of s3rver 3.7 the stand-in uses (the package ships no types).
declare module "s3rver" {
  import type { IncomingMessage, ServerResponse } from "node:http";
  export default class S3rver {
    constructor(options: { directory: string; silent?: boolean; configureBuckets?: { name: string }[] });
    store: {
      putBucket(name: string): Promise<void>;
      getResourcePath(bucket: string, key: string | undefined, resource: string): string;
    };
    callback(): (req: IncomingMessage, res: ServerResponse) => void;
  }
}
