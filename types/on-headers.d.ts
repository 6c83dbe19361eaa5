// on-headers 1.1.0 ships no types; the one function Parley uses.
declare module 'on-headers' {
  import type { ServerResponse } from 'node:http';
  export default function onHeaders(res: ServerResponse, listener: (this: ServerResponse) => void): void;
}
