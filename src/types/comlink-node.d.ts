// comlink ships its Node adapter without a declaration that NodeNext resolution finds.
declare module "comlink/dist/esm/node-adapter.mjs" {
  import type { Endpoint } from "comlink";
  interface NodePort {
    postMessage(message: unknown, transfer?: readonly unknown[]): void;
    on(type: string, listener: (value: unknown) => void): unknown;
    off(type: string, listener: (value: unknown) => void): unknown;
    start?: () => void;
  }
  export default function nodeEndpoint(port: NodePort): Endpoint;
}
