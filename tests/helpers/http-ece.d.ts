// http_ece ships no types; the part the tests use (RFC 8188 / RFC 8291 decryption).
declare module "http_ece" {
  import type { ECDH } from "node:crypto";
  const ece: {
    decrypt(buffer: Buffer, params: { version: "aes128gcm"; privateKey: ECDH; authSecret: Buffer }): Buffer;
  };
  export default ece;
}
