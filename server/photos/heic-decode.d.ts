// heic-decode 2.1.0 ships no types; this is the part Tideline calls.
declare module "heic-decode" {
  interface Decoded {
    width: number;
    height: number;
    data: Uint8ClampedArray;
  }
  function decode(opts: { buffer: Buffer | ArrayBuffer | Uint8Array }): Promise<Decoded>;
  export default decode;
}
