// comlink ships this adapter without a declaration the .mjs path resolves to.
declare module 'comlink/dist/esm/node-adapter.mjs' {
  import type { Endpoint } from 'comlink';
  export default function nodeEndpoint(nep: {
    postMessage(message: unknown, transfer?: unknown[]): void;
    on(type: string, listener: (...args: never[]) => void): void;
    off(type: string, listener: (...args: never[]) => void): void;
  }): Endpoint;
}
