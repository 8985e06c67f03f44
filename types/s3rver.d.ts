// The part of s3rver (a local S3 fake for tests) that the tests use; the package ships no types.
declare module 's3rver' {
  import type { AddressInfo } from 'node:net';
  export default class S3rver {
    constructor(options: { port?: number; address?: string; directory: string; silent?: boolean; resetOnClose?: boolean; allowMismatchedSignatures?: boolean });
    run(): Promise<AddressInfo>;
    close(): Promise<void>;
    /** S3 event notifications for what the fake stored or removed. */
    on(event: 'event', listener: (e: { Records: { eventName: string; s3: { object: { key: string } } }[] }) => void): this;
  }
}
