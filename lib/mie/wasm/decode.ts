/** The bytes of a module in lib/mie/wasm/modules.generated.ts (base64 there, to keep the generated file text). */
export function decodeWasm(base64: string): Uint8Array<ArrayBuffer> {
  return Uint8Array.from(atob(base64), (ch) => ch.charCodeAt(0));
}
